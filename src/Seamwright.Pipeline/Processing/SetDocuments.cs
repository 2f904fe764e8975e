using System.Text;
using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Alignment;
using Seamwright.Pipeline.Output;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// One output file of a set, ready to be written: path relative to the set folder ('/' separators),
/// manifest kind, and how to encode its bytes. Encoded only when written (<see cref="Bytes"/>
/// encodes again on every call), so a set never holds all of its encoded documents at once.
/// </summary>
public sealed record OutputFile(string Relative, string Kind, Func<byte[]> Encode)
{
    public OutputFile(string relative, string kind, byte[] bytes) : this(relative, kind, () => bytes) { }

    public byte[] Bytes => Encode();
}

/// <summary>What every output names about the program that made it.</summary>
public sealed record OutputStamp(string Engine, string DescriptorVersion, int AlgorithmVersion, string ToolVersion)
{
    public static OutputStamp Of(ProcessingContext ctx)
    {
        ArgumentNullException.ThrowIfNull(ctx);
        return new OutputStamp(ctx.Engine.Name, ctx.Engine.DescriptorVersion, ctx.AlgorithmVersion, ProcessingContext.ToolVersion);
    }
}

/// <summary>
/// The set's documents other than the manifest (pure: no file system): a tie-point file per pair
/// with a transform, a sidecar per good image, the preview and the report, each encoded when the
/// publisher writes it. To add
/// a sidecar field, change <see cref="Sidecar"/> and <c>docs/schemas/</c>.
/// </summary>
public static class SetDocuments
{
    public static IReadOnlyList<OutputFile> Build(SetRun run, OutputStamp stamp, PairStageResult pairs, AlignmentStageResult aligned)
    {
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(aligned);
        var files = new List<OutputFile>();
        var tiesOf = new Dictionary<int, string>();
        for (int k = 0; k < pairs.Pairs.Count; k++)
        {
            if (TiePoints(run, pairs, pairs.Pairs[k]) is { } ties)
            {
                files.Add(ties);
                tiesOf[k] = ties.Relative;
            }
        }
        for (int i = 0; i < pairs.Images.Count; i++)
        {
            int image = i;
            files.Add(new OutputFile(OutputLayout.SidecarRelative(pairs.Images[i].Key), "sidecar",
                () => OutputJson.Sidecar(Sidecar(run, stamp, pairs, aligned, image, tiesOf))));
        }
        if (aligned.Visuals.PreviewJpeg is { } preview)
        {
            files.Add(new OutputFile(SetVisuals.PreviewFileName, "preview", preview));
        }
        files.Add(new OutputFile(SetVisuals.ReportFileName, "report", () => Encoding.UTF8.GetBytes(aligned.Visuals.ReportHtml)));
        return files;
    }

    /// <summary>The tie-point file of a pair, or null when it was rejected or has no transform.</summary>
    public static OutputFile? TiePoints(SetRun run, PairStageResult pairs, PairResult pair)
    {
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(pair);
        var est = pair.Estimate;
        if (est.Status == PairStatus.Rejected || est.Transform is null)
        {
            return null;
        }
        return new OutputFile(OutputLayout.TiesRelative(pairs.KeyA(pair), pairs.KeyB(pair)), "tiepoints", () => OutputJson.TiePoints(new TiePointsDocument
        {
            Run = run.RunId,
            Set = run.SetId,
            ImageA = pairs.KeyA(pair),
            ImageB = pairs.KeyB(pair),
            Status = est.Status.Word(),
            Transform = est.Transform.Value.ToRows(),
            Count = pair.Analysis.TiePoints.Count,
            Points = pair.Analysis.TiePoints.Select(t => new[] { t.X1, t.Y1, t.X2, t.Y2 }).ToArray(),
        }));
    }

    /// <summary>The sidecar of good image <paramref name="i"/>: its placement and every planned pair it is part of.</summary>
    public static SidecarDocument Sidecar(SetRun run, OutputStamp stamp, PairStageResult pairs, AlignmentStageResult aligned, int i,
        IReadOnlyDictionary<int, string> tiesOf)
    {
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(stamp);
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(aligned);
        ArgumentNullException.ThrowIfNull(tiesOf);
        var links = new List<SidecarLink>();
        for (int k = 0; k < pairs.Pairs.Count; k++)
        {
            var pr = pairs.Pairs[k];
            if (pr.A == i || pr.B == i)
            {
                links.Add(Link(pairs, pr, forward: pr.A == i, tiesOf.GetValueOrDefault(k)));
            }
        }
        var g = pairs.Images[i];
        return new SidecarDocument
        {
            Image = g.Key,
            Set = run.SetId,
            Run = run.RunId,
            Width = g.Analysis!.Size.Width,
            Height = g.Analysis.Size.Height,
            Bytes = g.File.Size,
            Sha256 = g.Hash!,
            Reference = aligned.ReferenceNames[i],
            ToReference = aligned.ToReferenceRows[i],
            ToReferenceReason = aligned.ToReferenceReasons[i],
            Camera = aligned.Cameras[i],
            Links = links.ToArray(),
            SettingsFingerprint = run.Fingerprint,
            BaseSeed = run.Profile.Estimation.Seed.ToString(System.Globalization.CultureInfo.InvariantCulture),
            Engine = stamp.Engine,
            DescriptorVersion = stamp.DescriptorVersion,
            AlgorithmVersion = stamp.AlgorithmVersion,
            ToolVersion = stamp.ToolVersion,
        };
    }

    private static SidecarLink Link(PairStageResult pairs, PairResult pr, bool forward, string? ties)
    {
        var est = pr.Estimate;
        double[][]? transform = est.Transform is { } t
            ? forward ? t.ToRows() : t.TryInvert(out var inv) ? inv.ToRows() : null
            : null;
        return new SidecarLink
        {
            Other = forward ? pairs.KeyB(pr) : pairs.KeyA(pr),
            Transform = transform,
            Status = est.Status.Word(),
            InlierCount = est.InlierIndices.Length,
            MatchCount = est.MatchCount,
            FeaturePath = est.FeaturePath.Word(),
            CornerSigmaPx = OutputNumbers.FiniteOrNull(est.CornerSigmaPx),
            RmsResidualPx = OutputNumbers.FiniteOrNull(est.RmsResidualPx),
            Seed = est.Seed.ToString(System.Globalization.CultureInfo.InvariantCulture),
            TiePoints = ties,
            Reasons = est.Reasons,
        };
    }
}
