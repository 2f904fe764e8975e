using Seamwright.Core.Estimation;

namespace Seamwright.Pipeline.Report;

/// <summary>One image of the report.</summary>
/// <param name="Name">File name (relative to the set folder).</param>
/// <param name="Width">Full-resolution width in pixels.</param>
/// <param name="Height">Full-resolution height in pixels.</param>
/// <param name="ThumbnailJpeg">A small JPEG, or null when none could be made.</param>
/// <param name="ToReference">3x3 row-major transform into the reference, or null when unplaced.</param>
/// <param name="IsReference">True for the reference image of the main component.</param>
/// <param name="Note">Why it is unplaced, or another remark; null when none.</param>
public sealed record ReportImage(string Name, int Width, int Height, byte[]? ThumbnailJpeg, double[]? ToReference, bool IsReference, string? Note)
{
    /// <summary>True when the image has no transform into the reference plane but its camera block places it (a rotation set's frame looking away from the reference).</summary>
    public bool PlacedByCamera { get; init; }
}

/// <summary>One pair row of the confidence table.</summary>
/// <param name="ImageA">File name of the first image.</param>
/// <param name="ImageB">File name of the second image.</param>
/// <param name="Status">accepted, weak or rejected (lower case, as in the confidence log).</param>
/// <param name="Inliers">Final inlier count.</param>
/// <param name="Matches">Tentative match count.</param>
/// <param name="RmsPx">RMS residual over the inliers in pixels.</param>
/// <param name="CornerSigmaPx">Largest corner standard deviation in pixels.</param>
/// <param name="Reasons">The decision's reasons in words.</param>
/// <param name="AlignmentNote">Why the set alignment left the link out; null when it was used or never usable.</param>
/// <param name="FeaturePath">The features the estimate came from ("corners" or "scale-space").</param>
public sealed record ReportPair(string ImageA, string ImageB, string Status, int Inliers, int Matches, double RmsPx, double CornerSigmaPx,
    IReadOnlyList<string> Reasons, string? AlignmentNote, string FeaturePath = FeaturePathWords.Corners);

/// <summary>A labelled figure of the summary (already formatted).</summary>
/// <param name="Label">What the figure is.</param>
/// <param name="Value">The figure in words.</param>
/// <param name="Prose">An explanation in sentences: shown across the whole panel, in the text font, under its label.</param>
public sealed record ReportFact(string Label, string Value, bool Prose = false);

/// <summary>Everything the report shows, as plain data the service fills.</summary>
/// <param name="SetName">Name of the set.</param>
/// <param name="RunId">The run that produced it.</param>
/// <param name="Fingerprint">The settings fingerprint.</param>
/// <param name="MotionModel">Name of the model the set was placed in (the set model when no <see cref="SetReport.Facts"/> entry names one).</param>
/// <param name="Images">Images in set order.</param>
/// <param name="Pairs">One row per estimated pair.</param>
/// <param name="PreviewJpeg">The preview mosaic, or null when none was made.</param>
/// <param name="Facts">Summary figures (reference, components, canvas, residuals...).</param>
/// <param name="Warnings">Things a person should look at (split set, not planar, unplaced images...).</param>
public sealed record SetReport(
    string SetName,
    string RunId,
    string Fingerprint,
    string MotionModel,
    IReadOnlyList<ReportImage> Images,
    IReadOnlyList<ReportPair> Pairs,
    byte[]? PreviewJpeg,
    IReadOnlyList<ReportFact> Facts,
    IReadOnlyList<string> Warnings)
{
    /// <summary>The opening verdict in words (null in reports built without one).</summary>
    public VerdictText? Verdict { get; init; }

    /// <summary>The model each pair was estimated in (the profile's estimation model; null when not known).</summary>
    public string? PairModel { get; init; }

    /// <summary>Input folder, time, tool version, settings and left-out files (null when not known).</summary>
    public ReportProvenance? Provenance { get; init; }
}
