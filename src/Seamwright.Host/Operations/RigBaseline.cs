using System.Globalization;
using Seamwright.Core.Geometry;

namespace Seamwright.Host.Operations;

/// <summary>
/// For fixed camera rigs (`frames` pairing): the expected transform of each camera pair, either
/// configured or learned as the medoid of the first accepted results (the one with the smallest
/// summed corner distance to the others, so one bad early result cannot set the baseline).
/// A new result whose image corners land farther than the tolerance from where the baseline puts
/// them gets a reason in words. Deterministic; thread-safe.
/// </summary>
internal sealed class RigBaseline(int learnFromFirst = 5, double tolerancePixels = 8.0)
{
    private readonly Dictionary<(string, string), Transform2D> _baselines = [];
    private readonly Dictionary<(string, string), List<Transform2D>> _learning = [];

    /// <summary>Sets a configured baseline (wins over learning).</summary>
    public void Configure(string cameraA, string cameraB, Transform2D aToB)
    {
        lock (_baselines)
        {
            _baselines[(cameraA, cameraB)] = aToB.Normalized();
            _learning.Remove((cameraA, cameraB));
        }
    }

    public Transform2D? BaselineOf(string cameraA, string cameraB)
    {
        lock (_baselines)
        {
            return _baselines.TryGetValue((cameraA, cameraB), out var t) ? t : null;
        }
    }

    /// <summary>
    /// Checks one accepted result of camera A to camera B on images of <paramref name="size"/>
    /// (A's size). Returns a deviation reason, or null when within tolerance or still learning.
    /// </summary>
    public string? Check(string cameraA, string cameraB, Transform2D aToB, ImageSize size)
    {
        var corners = Transform2D.Corners(size.Width, size.Height);
        lock (_baselines)
        {
            var key = (cameraA, cameraB);
            if (!_baselines.TryGetValue(key, out var baseline))
            {
                if (!_learning.TryGetValue(key, out var seen))
                {
                    _learning[key] = seen = [];
                }
                seen.Add(aToB.Normalized());
                if (seen.Count >= learnFromFirst)
                {
                    _baselines[key] = Medoid(seen, corners);
                    _learning.Remove(key);
                }
                return null;
            }
            double deviation = Transform2D.MaxPointDistance(baseline, aToB, corners);
            return deviation > tolerancePixels
                ? string.Create(CultureInfo.InvariantCulture,
                    $"rig baseline {cameraA}->{cameraB}: a corner lands {deviation:0.0} px from the baseline (tolerance {tolerancePixels:0.0} px); the camera may have moved")
                : null;
        }
    }

    private static Transform2D Medoid(List<Transform2D> candidates, (double X, double Y)[] corners)
    {
        int best = 0;
        double bestSum = double.PositiveInfinity;
        for (int i = 0; i < candidates.Count; i++)
        {
            double sum = 0;
            for (int j = 0; j < candidates.Count; j++)
            {
                sum += Transform2D.MaxPointDistance(candidates[i], candidates[j], corners);
            }
            if (sum < bestSum)
            {
                bestSum = sum;
                best = i;
            }
        }
        return candidates[best];
    }
}
