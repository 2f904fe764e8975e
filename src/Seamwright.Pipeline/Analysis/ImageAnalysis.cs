using Seamwright.Core.Geometry;

namespace Seamwright.Pipeline.Analysis;

/// <summary>
/// What the pipeline keeps of one analysed image: its full-resolution size, a coarse signature
/// for the pre-filter of the <c>all</c> pairing, and the engine's own payload (keypoints and
/// descriptors for the real engine), opaque to the pipeline.
/// </summary>
public sealed class ImageAnalysis
{
    public required ImageSize Size { get; init; }

    /// <summary>Coarse signature (unit-length vector) compared by the <c>all</c> pre-filter.</summary>
    public required float[] Coarse { get; init; }

    /// <summary>Capture time from the image metadata, when present.</summary>
    public DateTimeOffset? CaptureTime { get; init; }

    public required object Payload { get; init; }

    /// <summary>The same analysis without the engine's payload: what a set keeps of every image while its pairs read features on demand.</summary>
    public ImageAnalysis WithoutPayload() => new() { Size = Size, Coarse = Coarse, CaptureTime = CaptureTime, Payload = NotHeld };

    /// <summary>The payload of an analysis whose features are not held in memory.</summary>
    public static readonly object NotHeld = new();
}

/// <summary>An image the engine refused, with a reason in words (recorded, never fatal).</summary>
public sealed class ImageRejectedException : Exception
{
    public ImageRejectedException() : base("image rejected") { }

    public ImageRejectedException(string message) : base(message) { }

    public ImageRejectedException(string message, Exception inner) : base(message, inner) { }
}
