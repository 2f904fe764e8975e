using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Preview;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Analysis;

/// <summary>The result of one pair: the estimate and the full-resolution tie points (inlier matches).</summary>
public sealed record PairAnalysis(PairEstimate Estimate, IReadOnlyList<Correspondence> TiePoints);

/// <summary>
/// The seam between the service and the image algorithms: analyse one image (decode with limits,
/// features), encode that analysis for the feature cache, and estimate one pair.
/// Implementations are thread-safe; calls for different images or pairs may run in parallel.
/// </summary>
public interface IPairEngine
{
    /// <summary>Engine name as configured ("features", "checksum").</summary>
    string Name { get; }

    /// <summary>Version of the descriptor sampling pattern carried by the features.</summary>
    string DescriptorVersion { get; }

    /// <summary>Bumped whenever the engine's results change for the same inputs and settings.</summary>
    int AlgorithmVersion { get; }

    /// <summary>Decodes and analyses one image. Throws <see cref="ImageRejectedException"/> for a bad file.</summary>
    ImageAnalysis Analyze(string path, FeatureSettings features, LimitSettings limits, MemoryBudget budget, CancellationToken cancel);

    byte[] Encode(ImageAnalysis analysis);

    ImageAnalysis Decode(ReadOnlySpan<byte> data);

    PairAnalysis EstimatePair(ImageAnalysis a, ImageAnalysis b, EstimationSettings settings, ulong seed);

    /// <summary>
    /// Whether <see cref="EstimatePair"/> honours <see cref="EstimationSettings.ScaleSpaceLook"/> (a
    /// second look with scale-space features); the pairs stage runs its second pass only then.
    /// Decorators forward it.
    /// </summary>
    bool HasSecondLook => false;

    /// <summary>
    /// Opens the set's images (by index into <paramref name="paths"/>) in colour for the preview
    /// and the report's thumbnails, with the run's limits; an image that cannot be opened gives
    /// null. In this process by default (<see cref="PreviewLoader"/>); the service's engine opens
    /// them in its supervised workers, like every other decode.
    /// </summary>
    PreviewImageOpener PreviewOpener(IReadOnlyList<string> paths, LimitSettings limits, MemoryBudget budget) =>
        new PreviewLoader(paths, limits, budget).Open;
}
