using Seamwright.Core.Estimation;

namespace Seamwright.Pipeline.Settings;

/// <summary>How images of a set are paired for estimation.</summary>
public enum PairingMode
{
    /// <summary><c>Grid</c> when every image name in the set matches the grid pattern, otherwise <c>Sequence</c>.</summary>
    Auto,
    /// <summary>Neighbours in name or capture-time order, within a span.</summary>
    Sequence,
    /// <summary>Row and column read from the file name; 4-neighbours (and diagonals by setting).</summary>
    Grid,
    /// <summary>Every pair that passes a cheap pre-filter on coarse image signatures.</summary>
    All,
    /// <summary>Same frame from several cameras: every camera pair within the frame set.</summary>
    Frames,
}

/// <summary>Order of images for <see cref="PairingMode.Sequence"/>.</summary>
public enum SequenceOrder
{
    /// <summary>Natural sort of the file names ("img2" before "img10").</summary>
    Name,
    /// <summary>EXIF capture time, falling back to the name for images without one.</summary>
    CaptureTime,
}

/// <summary>Pair planning settings of a profile.</summary>
public sealed class PairingSettings
{
    public PairingMode Mode { get; set; } = PairingMode.Auto;
    public SequenceOrder Order { get; set; } = SequenceOrder.Name;
    /// <summary>Each image is paired with the next <c>NeighbourSpan</c> images (at least 2, so loops exist).</summary>
    public int NeighbourSpan { get; set; } = 2;
    /// <summary>Also pair the end of the sequence with its start (a closed 360-degree turn).</summary>
    public bool Wrap { get; set; }
    /// <summary>Regular expression with named groups <c>row</c> and <c>col</c>, matched against the file name.</summary>
    public string GridPattern { get; set; } = @"r(?<row>\d+)[_-]?c(?<col>\d+)";
    /// <summary>Also pair diagonal grid neighbours.</summary>
    public bool GridDiagonals { get; set; }
    /// <summary>In <c>all</c> mode, each image keeps at most this many best-ranked partners from the pre-filter.</summary>
    public int AllMaxPartners { get; set; } = 4;
    /// <summary>In <c>all</c> mode, pairs whose coarse similarity (0..1) is below this are dropped.</summary>
    public double AllMinSimilarity { get; set; } = 0.5;
}

/// <summary>When a set counts as complete.</summary>
public sealed class CompletionSettings
{
    /// <summary>Seconds without any change in the set before it is complete (when no marker or count is set).</summary>
    public double QuietSeconds { get; set; } = 10;
    /// <summary>File name whose presence in the set folder marks the set complete ("" = not used).</summary>
    public string ReadyMarker { get; set; } = "";
    /// <summary>Number of images that completes the set (0 = not used).</summary>
    public int ExpectedCount { get; set; }
    /// <summary>Seconds after the first file arrived when the set is processed anyway and marked incomplete.</summary>
    public double MaxWaitSeconds { get; set; } = 3600;
}

/// <summary>An excluded rectangle, in fractions (0..1) of the image width and height.</summary>
public sealed class MaskRect
{
    public double X { get; set; }
    public double Y { get; set; }
    public double Width { get; set; }
    public double Height { get; set; }
}

/// <summary>Settings that shape the per-image features (the feature-cache fingerprint covers exactly these).</summary>
public sealed class FeatureSettings
{
    /// <summary>
    /// Size of the analysis image in megapixels: larger images are shrunk to it for corner detection
    /// (tie points are re-localised at full resolution). Key <c>Features:AnalysisMegapixels</c>; the
    /// key it replaces is still read for one release (Host/Configuration/RenamedSettings.cs).
    /// </summary>
    public double AnalysisMegapixels { get; set; } = 2.0;
    /// <summary>Most keypoints kept per image.</summary>
    public int MaxKeypoints { get; set; } = 4000;
    /// <summary>Regions excluded from detection (rulers, colour targets, timestamps).</summary>
    public List<MaskRect> Masks { get; set; } = [];
}

/// <summary>Settings that shape a pairwise estimate and its decision.</summary>
public sealed class EstimationSettings
{
    public MotionModel MotionModel { get; set; } = MotionFamily.Homography.Model;
    /// <summary>Inlier threshold on the forward transfer error, in full-resolution pixels.</summary>
    public double ThresholdPx { get; set; } = 3.0;
    /// <summary>Base seed; each pair derives its own seed from it and a stable hash of the pair.</summary>
    public ulong Seed { get; set; } = 20261201;
    /// <summary>Lowe's ratio test bound (Lowe, IJCV 2004: 0.8).</summary>
    public double RatioTest { get; set; } = 0.8;
    /// <summary>Run the deterministic consensus refinement after sampling.</summary>
    public bool RefineConsensus { get; set; } = true;
    /// <summary>Give pairs the corners leave weak, rejected or with few inliers a second look with scale-space features.</summary>
    public bool ScaleSpaceLook { get; set; } = true;
    /// <summary>Within the second look, as a last step for pairs still rejected: match simulated tilted views (affine view synthesis).</summary>
    public bool AffineViews { get; set; } = true;

    /// <summary>
    /// A copy with the second look on or off: a set's pairs are estimated first without it, and the
    /// undecided pairs expected to overlap again with it (Processing/PairStage), each pass under its own
    /// pair fingerprint.
    /// </summary>
    public EstimationSettings WithScaleSpaceLook(bool on)
    {
        var copy = (EstimationSettings)MemberwiseClone();
        copy.ScaleSpaceLook = on;
        return copy;
    }
    /// <summary>Confidence of the sampling termination bound (the standard RANSAC stopping rule).</summary>
    public double Confidence { get; set; } = 0.99;
    /// <summary>Most sampling iterations per pair (a work cap, never a time cap).</summary>
    public int MaxIterations { get; set; } = 10000;
}

/// <summary>A named group of settings applied to the sets of a watched root (or to sets matching a rule).</summary>
public sealed class ProfileSettings
{
    public PairingSettings Pairing { get; set; } = new();
    public CompletionSettings Completion { get; set; } = new();
    public FeatureSettings Features { get; set; } = new();
    public EstimationSettings Estimation { get; set; } = new();
    /// <summary>Set alignment, preview and report.</summary>
    public Seamwright.Pipeline.Alignment.AlignmentSettings Alignment { get; set; } = new();
    /// <summary>File extensions taken as images (case-insensitive). Empty = the default list.</summary>
    public List<string> Extensions { get; set; } = [];
    /// <summary>`Frames` pairing: configured baselines per camera pair (win over learning).</summary>
    public List<RigBaselineSetting> RigBaselines { get; set; } = [];
    /// <summary>`Frames` pairing: accepted results per camera pair that set a learned baseline (their medoid).</summary>
    public int RigLearnFromFirst { get; set; } = 5;
    /// <summary>`Frames` pairing: largest corner deviation from the baseline, pixels, before an accepted pair becomes weak.</summary>
    public double RigTolerancePx { get; set; } = 8;

    public static readonly string[] DefaultExtensions = [".jpg", ".jpeg", ".png", ".tif", ".tiff", ".bmp", ".webp"];

    public IReadOnlyList<string> EffectiveExtensions => Extensions.Count > 0 ? Extensions : DefaultExtensions;
}
