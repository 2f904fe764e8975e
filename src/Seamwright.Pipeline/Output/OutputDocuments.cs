using System.Text.Json.Serialization;

namespace Seamwright.Pipeline.Output;

// The shapes of our output files. Each carries a "schema" string "seamwright.<kind>/<version>";
// the JSON Schema files in docs/schemas/ describe them. Bump the version when a field changes
// meaning or disappears; adding an optional field keeps it.

/// <summary>Schema ids of the output files.</summary>
public static class SchemaIds
{
    public const string Sidecar = "seamwright.sidecar.v1";
    public const string TiePoints = "seamwright.tiepoints.v1";
    public const string Manifest = "seamwright.manifest.v1";
    public const string Confidence = "seamwright.confidence.v1";
}

/// <summary>The link from one image to a neighbour, as seen from this image.</summary>
public sealed record SidecarLink
{
    public required string Other { get; init; }
    /// <summary>3x3 row-major rows mapping this image's full-resolution pixels to the other's; null when no model exists.</summary>
    public required double[][]? Transform { get; init; }
    public required string Status { get; init; }
    public required int InlierCount { get; init; }
    public required int MatchCount { get; init; }
    /// <summary>The features the link's estimate came from: "corners" or "scale-space" (the second look).</summary>
    public required string FeaturePath { get; init; }
    /// <summary>Null when it cannot be computed (for example no model or too few inliers).</summary>
    public required double? CornerSigmaPx { get; init; }
    public required double? RmsResidualPx { get; init; }
    /// <summary>The pair's 64-bit seed as a decimal string (JSON numbers above 2^53 lose precision in common readers).</summary>
    public required string Seed { get; init; }
    /// <summary>Tie-point file, relative to the set's output folder; null when none was written.</summary>
    public required string? TiePoints { get; init; }
    public required string[] Reasons { get; init; }
}

/// <summary>Per-image sidecar <c>&lt;image file name&gt;.seam.json</c>.</summary>
public sealed record SidecarDocument
{
    public string Schema { get; init; } = SchemaIds.Sidecar;
    public required string Image { get; init; }
    public required string Set { get; init; }
    public required long Run { get; init; }
    /// <summary>Full-resolution size of the image as displayed (after the EXIF orientation).</summary>
    public required int Width { get; init; }
    public required int Height { get; init; }
    public required long Bytes { get; init; }
    public required string Sha256 { get; init; }
    /// <summary>File name of the set's reference image; filled by the set alignment (null until then).</summary>
    public string? Reference { get; init; }
    /// <summary>3x3 row-major rows mapping this image's pixels to the reference image's; filled by the set alignment.</summary>
    public double[][]? ToReference { get; init; }
    /// <summary>Why <see cref="ToReference"/> is null (null when it is present).</summary>
    public string? ToReferenceReason { get; init; }
    /// <summary>The camera of a rotation set (focal, principal point, rotation, distortion); null for planar sets.</summary>
    public Seamwright.Pipeline.Alignment.SidecarCamera? Camera { get; init; }
    public required SidecarLink[] Links { get; init; }
    public required string SettingsFingerprint { get; init; }
    /// <summary>The profile's base seed as a decimal string.</summary>
    public required string BaseSeed { get; init; }
    public required string Engine { get; init; }
    public required string DescriptorVersion { get; init; }
    public required int AlgorithmVersion { get; init; }
    public required string ToolVersion { get; init; }
}

/// <summary>Tie points of one pair: full-resolution inlier matches (x in A, y in A, x in B, y in B).</summary>
public sealed record TiePointsDocument
{
    public string Schema { get; init; } = SchemaIds.TiePoints;
    public required long Run { get; init; }
    public required string Set { get; init; }
    public required string ImageA { get; init; }
    public required string ImageB { get; init; }
    public required string Status { get; init; }
    public required double[][]? Transform { get; init; }
    public required int Count { get; init; }
    public required double[][] Points { get; init; }
}

/// <summary>A file of the run named by the manifest, with its digest.</summary>
public sealed record ManifestEntry(string Path, string Kind, string Sha256);

/// <summary>An input file skipped by the run, with the reason.</summary>
public sealed record ManifestSkipped(string Image, string Reason);

/// <summary>Pair counts of a run.</summary>
public sealed record ManifestCounts(int Images, int BadFiles, int Pairs, int Accepted, int Weak, int Rejected);

/// <summary>
/// The set manifest, written last: the signal that a run of the set is complete. A reader trusts
/// only the files it lists, with these digests.
/// </summary>
public sealed record ManifestDocument
{
    public string Schema { get; init; } = SchemaIds.Manifest;
    public required long Run { get; init; }
    /// <summary>When the run wrote its outputs, UTC, ISO 8601 (not part of any determinism comparison).</summary>
    public required string Time { get; init; }
    public required string Set { get; init; }
    public required string Profile { get; init; }
    /// <summary>True when the set was processed after its maximum wait without being complete.</summary>
    public required bool Incomplete { get; init; }
    public required string SettingsFingerprint { get; init; }
    public required int AlgorithmVersion { get; init; }
    public required string ToolVersion { get; init; }
    public required string Engine { get; init; }
    /// <summary>The node that made the run; written only when several nodes share the ledger (PostgreSql).</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingNull)]
    public string? Node { get; init; }
    public required string[] Images { get; init; }
    public required ManifestSkipped[] Skipped { get; init; }
    public required ManifestCounts Counts { get; init; }
    public required ManifestEntry[] Files { get; init; }
    /// <summary>The set alignment: reference, components, canvas, residuals, unplaced images, left-out links.</summary>
    public Seamwright.Pipeline.Alignment.ManifestAlignment? Alignment { get; init; }
}

/// <summary>One line of <c>confidence.jsonl</c>: one pair (kind "pair") or one unusable file (kind "file") of one run.</summary>
public sealed record ConfidenceRecord
{
    public string Schema { get; init; } = SchemaIds.Confidence;
    public required string Kind { get; init; }
    public required long Run { get; init; }
    /// <summary>When the record was written, UTC, ISO 8601 (like <c>timingsMs</c>, not part of any determinism comparison).</summary>
    public required string Time { get; init; }
    public required string Set { get; init; }
    public required string ImageA { get; init; }
    public required string? ImageB { get; init; }
    public required string Status { get; init; }
    /// <summary>Null for kind "file" (nothing was estimated).</summary>
    public required int? InlierCount { get; init; }
    public required int? MatchCount { get; init; }
    /// <summary>3x3 row-major rows mapping A to B (null when none).</summary>
    public required double[][]? Homography { get; init; }
    /// <summary>Null for kind "file".</summary>
    public required string? MotionModel { get; init; }
    /// <summary>"corners" or "scale-space" (the second look decided); null for kind "file".</summary>
    public required string? FeaturePath { get; init; }
    /// <summary>Null when it cannot be computed (for example no model or too few inliers).</summary>
    public required double? CornerSigmaPx { get; init; }
    public required double? RmsResidualPx { get; init; }
    public required ConfidenceConsensus? Consensus { get; init; }
    /// <summary>The pair's 64-bit seed as a decimal string (a JSON number above 2^53 loses precision in common readers); null for kind "file".</summary>
    public required string? Seed { get; init; }
    public required string[] Reasons { get; init; }
    /// <summary>Null for kind "file".</summary>
    public required ConfidenceTimings? TimingsMs { get; init; }
    public required string SettingsFingerprint { get; init; }
    /// <summary>The node that made the run; written only when several nodes share the ledger (PostgreSql).</summary>
    [JsonIgnore(Condition = JsonIgnoreCondition.WhenWritingNull)]
    public string? Node { get; init; }
}

public sealed record ConfidenceConsensus(int Sampling, int Refined, int Final, int RunnerUp, int LinearPrograms, int Iterations);

/// <summary>Milliseconds: the estimate's own stages and the whole pair including features (not part of any determinism comparison).</summary>
public sealed record ConfidenceTimings(double Sampling, double Refinement, double Polish, double Estimate, double Pair);

[JsonSourceGenerationOptions(PropertyNamingPolicy = JsonKnownNamingPolicy.CamelCase, WriteIndented = true)]
[JsonSerializable(typeof(SidecarDocument))]
[JsonSerializable(typeof(TiePointsDocument))]
[JsonSerializable(typeof(ManifestDocument))]
internal sealed partial class IndentedJson : JsonSerializerContext;

[JsonSourceGenerationOptions(PropertyNamingPolicy = JsonKnownNamingPolicy.CamelCase, WriteIndented = false)]
[JsonSerializable(typeof(ConfidenceRecord))]
[JsonSerializable(typeof(TiePointsDocument))]
internal sealed partial class CompactJson : JsonSerializerContext;
