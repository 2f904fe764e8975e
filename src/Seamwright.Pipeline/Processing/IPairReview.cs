using Seamwright.Core.Geometry;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// A host-side check of accepted pairs of <c>frames</c> sets (fixed camera rigs). Called once per
/// accepted pair, in plan order, after all pairs of the set are estimated and before any output is
/// written. A returned reason is added to the pair's reasons and the pair becomes weak.
/// </summary>
public interface IPairReview
{
    /// <param name="imageA">Key of image A within the set (root-relative path for pattern sets).</param>
    /// <param name="aToB">The accepted transform mapping A to B.</param>
    /// <param name="sizeA">Size of image A.</param>
    /// <returns>A reason in words, or null when the pair is as expected.</returns>
    /// <param name="profileName">The set's profile; <paramref name="profile"/> its current settings.</param>
    string? ReviewAccepted(string profileName, Settings.ProfileSettings profile, string setId, string imageA, string imageB, Transform2D aToB, ImageSize sizeA);
}
