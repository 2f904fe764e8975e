using System.Diagnostics;
using System.Globalization;
using System.Text;
using System.Security.Cryptography;
using Seamwright.Core.Estimation;
using Seamwright.Pipeline.Alignment;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Planning;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.State;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// Processes one set from its input files to its outputs: hash and analyse every image (feature
/// cache first), plan the pairs, estimate them, then write tie points, sidecars, confidence
/// records and, last, the manifest; finally record the run in the ledger. Inputs are only ever
/// opened for reading. A bad image is recorded with its reason and the rest proceeds.
/// </summary>
public sealed class SetProcessor(ProcessingContext ctx)
{
    private sealed class ImageResult
    {
        public required InputFile File { get; init; }
        public string? Hash { get; set; }
        public ImageAnalysis? Analysis { get; set; }
        public bool Decoded { get; set; }
        public string? BadReason { get; set; }
    }

    private sealed record PairResult(int A, int B, PairAnalysis Analysis, double PairMs);

    private sealed class InputsChangedException(string message) : Exception(message);

    private sealed class LeaseLostException(string message) : Exception(message);

    public SetOutcome Process(SetInputs set, bool incomplete, CancellationToken cancel)
    {
        ArgumentNullException.ThrowIfNull(set);
        return ctx.Store.IsShared ? SharedRuns.ProcessClaimed(ctx, set, () => ProcessOwned(set, incomplete, cancel)) : ProcessOwned(set, incomplete, cancel);
    }

    private SetOutcome ProcessOwned(SetInputs set, bool incomplete, CancellationToken cancel)
    {
        var profile = ctx.Options.Profile(set.Profile);
        string fingerprint = ctx.FingerprintFor(set.Profile);
        long runId = ctx.Store.BeginRun(set.SetId, set.Profile, fingerprint, ProcessingContext.ToolVersion, ctx.NodeName);
        ctx.Observer.SetStarted(set.SetId, runId, set.Files.Count);
        try
        {
            try
            {
                var images = AnalyseAll(set, profile, cancel);
                EnsureUnchanged(set);
                var done = Finish(set, profile, fingerprint, runId, incomplete, images, cancel);
                ctx.Observer.SetFinished(done);
                return done;
            }
            catch (AggregateException ae)
            {
                // Parallel loops wrap the body's exception; surface the first one as if thrown directly.
                var first = ae.Flatten().InnerExceptions.FirstOrDefault(x => x is InputsChangedException or OperationCanceledException)
                    ?? ae.Flatten().InnerExceptions[0];
                System.Runtime.ExceptionServices.ExceptionDispatchInfo.Capture(first).Throw();
                throw;
            }
        }
        catch (LeaseLostException e)
        {
            ctx.Store.AbandonRun(runId, set.SetId, SetStates.Pending, set.Profile, e.Message);
            var outcome = new SetOutcome(set.SetId, SetOutcomeKind.Deferred, runId, null, e.Message);
            ctx.Observer.SetFinished(outcome);
            return outcome;
        }
        catch (System.Data.Common.DbException) when (ctx.Store.IsShared)
        {
            throw; // the shared ledger is unreachable: SharedRuns defers the set (recording anything would fail too)
        }
        catch (InputsChangedException e)
        {
            ctx.Store.AbandonRun(runId, set.SetId, SetStates.Pending, set.Profile, e.Message);
            var outcome = new SetOutcome(set.SetId, SetOutcomeKind.Changed, runId, null, e.Message);
            ctx.Observer.SetFinished(outcome);
            return outcome;
        }
        catch (OperationCanceledException)
        {
            ctx.Store.AbandonRun(runId, set.SetId, SetStates.Pending, set.Profile, "interrupted by shutdown");
            throw;
        }
        catch (Exception e) when (e is not OperationCanceledException)
        {
            string reason = e.GetType().Name + ": " + e.Message;
            ctx.Store.AbandonRun(runId, set.SetId, SetStates.Failed, set.Profile, reason);
            ctx.Store.RecordFailure(runId, set.SetId, set.SetId, reason);
            var outcome = new SetOutcome(set.SetId, SetOutcomeKind.Failed, runId, null, reason);
            ctx.Observer.SetFinished(outcome);
            return outcome;
        }
    }

    private ImageResult[] AnalyseAll(SetInputs set, Settings.ProfileSettings profile, CancellationToken cancel)
    {
        string featureFp = Settings.SettingsFingerprint.ForFeatures(profile.Features, ctx.Engine.Name, ctx.Engine.DescriptorVersion);
        var results = set.Files.Select(f => new ImageResult { File = f }).ToArray();
        Parallel.ForEach(results, new ParallelOptions { MaxDegreeOfParallelism = ctx.Options.Service.MaxParallelJobs, CancellationToken = cancel }, r =>
        {
            ctx.JobSlots.Wait(cancel);
            try
            {
                AnalyseOne(set.SetId, r, profile, featureFp, cancel);
            }
            finally
            {
                ctx.JobSlots.Release();
            }
        });
        return results;
    }

    private void AnalyseOne(string setId, ImageResult r, Settings.ProfileSettings profile, string featureFp, CancellationToken cancel)
    {
        try
        {
            r.Hash = HashFile(r.File.FullPath);
        }
        catch (FileNotFoundException)
        {
            throw new InputsChangedException($"{r.File.Key} vanished while the set was being processed");
        }
        catch (DirectoryNotFoundException)
        {
            throw new InputsChangedException($"{r.File.Key} vanished while the set was being processed");
        }
        catch (IOException e)
        {
            r.BadReason = "the file cannot be read: " + e.Message;
        }
        catch (UnauthorizedAccessException e)
        {
            r.BadReason = "no permission to read the file: " + e.Message;
        }
        if (r.BadReason is null)
        {
            if (ctx.Cache.TryGet(r.Hash!, featureFp, out var cached))
            {
                r.Analysis = cached.WithoutPayload();
            }
            else
            {
                try
                {
                    var analysis = ctx.Engine.Analyze(r.File.FullPath, profile.Features, ctx.Options.Limits, ctx.Budget, cancel);
                    r.Decoded = true;
                    // Features live in the cache from here on; the pairs read them back within a bounded memory (PairRunner).
                    ctx.Cache.Put(r.Hash!, featureFp, analysis);
                    r.Analysis = analysis.WithoutPayload();
                }
                catch (ImageRejectedException e)
                {
                    r.Decoded = true;
                    r.BadReason = e.Message;
                }
                catch (OutOfMemoryException)
                {
                    r.Decoded = true;
                    r.BadReason = "decoding ran out of memory";
                }
            }
        }
        if (r.BadReason is not null)
        {
            ctx.Observer.BadFile(setId, r.File.Key, r.BadReason);
        }
        else
        {
            ctx.Observer.ImageDone(setId, r.File.Key, !r.Decoded);
        }
    }

    /// <summary>A file that changed during the run makes the run's results describe nothing real: abandon and wait.</summary>
    private static void EnsureUnchanged(SetInputs set)
    {
        foreach (var f in set.Files)
        {
            var info = new FileInfo(f.FullPath);
            if (!info.Exists)
            {
                throw new InputsChangedException($"{f.Key} was removed while the set was being processed");
            }
            if (info.Length != f.Size || info.LastWriteTimeUtc.Ticks != f.MtimeTicks)
            {
                throw new InputsChangedException($"{f.Key} changed while the set was being processed");
            }
        }
    }

    private SetOutcome Finish(SetInputs set, Settings.ProfileSettings profile, string fingerprint, long runId, bool incomplete,
        ImageResult[] images, CancellationToken cancel)
    {
        var good = images.Where(i => i.Analysis is not null).ToList();
        var plan = PairPlanner.Plan(profile.Pairing, good.Select(g => new PlanImage(g.File.Key, g.Analysis!.CaptureTime, g.Analysis.Coarse)).ToList());
        ctx.Observer.PairsPlanned(set.SetId, plan.Pairs.Count);
        var review = profile.Pairing.Mode == Settings.PairingMode.Frames ? ctx.Review : null;
        var pairImages = good.Select(g => new PairImage(g.File.Key, g.Hash!, g.File.FullPath)).ToList();
        var pairResults = PairRunner.Run(ctx, set.SetId, profile, pairImages, plan.Pairs, reportEach: review is null, cancel)
            .Select(r => new PairResult(r.A, r.B, r.Analysis, r.PairMs)).ToArray();
        if (review is not null)
        {
            ReviewPairs(review, set, profile, good, pairResults);
        }

        string setFolder = OutputLayout.SetFolder(ctx.OutputRoot, set.SetId);
        var writes = new List<(string Relative, string Kind, byte[] Bytes)>();
        var aligned = AlignSet(set, profile, fingerprint, runId, good, pairResults);
        var tiesOf = new Dictionary<int, string>();
        for (int k = 0; k < pairResults.Length; k++)
        {
            var pr = pairResults[k];
            var est = pr.Analysis.Estimate;
            if (est.Status == PairStatus.Rejected || est.Transform is null)
            {
                continue;
            }
            string rel = OutputLayout.TiesRelative(good[pr.A].File.Key, good[pr.B].File.Key);
            var doc = new TiePointsDocument
            {
                Run = runId,
                Set = set.SetId,
                ImageA = good[pr.A].File.Key,
                ImageB = good[pr.B].File.Key,
                Status = StatusName(est.Status),
                Transform = est.Transform.Value.ToRows(),
                Count = pr.Analysis.TiePoints.Count,
                Points = pr.Analysis.TiePoints.Select(t => new[] { t.X1, t.Y1, t.X2, t.Y2 }).ToArray(),
            };
            writes.Add((rel, "tiepoints", OutputJson.TiePoints(doc)));
            tiesOf[k] = rel;
        }

        var skippedByKey = plan.Skipped.ToDictionary(s => s.Key, s => s.Reason, StringComparer.Ordinal);
        for (int i = 0; i < good.Count; i++)
        {
            var links = new List<SidecarLink>();
            for (int k = 0; k < pairResults.Length; k++)
            {
                var pr = pairResults[k];
                if (pr.A != i && pr.B != i)
                {
                    continue;
                }
                var est = pr.Analysis.Estimate;
                bool forward = pr.A == i;
                double[][]? transform = est.Transform is { } t
                    ? forward ? t.ToRows() : t.TryInvert(out var inv) ? inv.ToRows() : null
                    : null;
                links.Add(new SidecarLink
                {
                    Other = good[forward ? pr.B : pr.A].File.Key,
                    Transform = transform,
                    Status = StatusName(est.Status),
                    InlierCount = est.InlierIndices.Length,
                    MatchCount = est.MatchCount,
                    CornerSigmaPx = OutputNumbers.FiniteOrNull(est.CornerSigmaPx),
                    RmsResidualPx = OutputNumbers.FiniteOrNull(est.RmsResidualPx),
                    Seed = est.Seed,
                    TiePoints = tiesOf.GetValueOrDefault(k),
                    Reasons = est.Reasons,
                });
            }
            var g = good[i];
            var sidecar = new SidecarDocument
            {
                Image = g.File.Key,
                Set = set.SetId,
                Run = runId,
                Width = g.Analysis!.Size.Width,
                Height = g.Analysis.Size.Height,
                Bytes = g.File.Size,
                Sha256 = g.Hash!,
                Reference = aligned.ReferenceNames[i],
                ToReference = aligned.ToReferenceRows[i],
                Links = links.ToArray(),
                SettingsFingerprint = fingerprint,
                BaseSeed = profile.Estimation.Seed,
                Engine = ctx.Engine.Name,
                DescriptorVersion = ctx.Engine.DescriptorVersion,
                AlgorithmVersion = ctx.AlgorithmVersion,
                ToolVersion = ProcessingContext.ToolVersion,
            };
            writes.Add((OutputLayout.SidecarRelative(g.File.Key), "sidecar", OutputJson.Sidecar(sidecar)));
        }
        if (aligned.Visuals.PreviewJpeg is { } preview)
        {
            writes.Add((SetVisuals.PreviewFileName, "preview", preview));
        }
        writes.Add((SetVisuals.ReportFileName, "report", Encoding.UTF8.GetBytes(aligned.Visuals.ReportHtml)));
        // Each file is flushed to disk before its rename; several at once let the file system
        // commit their journal entries together (one fsync each, far fewer waits).
        var entries = new ManifestEntry[writes.Count];
        Parallel.For(0, writes.Count, new ParallelOptions { MaxDegreeOfParallelism = 8 }, i =>
            entries[i] = Write(setFolder, writes[i].Relative, writes[i].Kind, writes[i].Bytes));

        var records = new List<ConfidenceRecord>();
        foreach (var bad in images.Where(i => i.BadReason is not null))
        {
            records.Add(FileRecord(set.SetId, runId, fingerprint, bad.File.Key, bad.BadReason!));
        }
        foreach (var (key, reason) in plan.Skipped)
        {
            records.Add(FileRecord(set.SetId, runId, fingerprint, key, reason));
        }
        foreach (var pr in pairResults)
        {
            records.Add(PairRecord(set.SetId, runId, fingerprint, good[pr.A].File.Key, good[pr.B].File.Key, pr));
        }
        if (ctx.OutputNode is { } node)
        {
            records = records.Select(r => r with { Node = node }).ToList();
        }
        // A node that lost its claim (a lease that ran out while it was cut off) publishes nothing.
        if (ctx.Store.IsShared && !ctx.Store.HoldsClaim(set.SetId, ctx.NodeName, ctx.LeaseMilliseconds))
        {
            throw new LeaseLostException($"this node ({ctx.NodeName}) lost its claim on the set before publishing; another node redoes it");
        }
        ctx.Log.Append(records);

        int badCount = images.Count(i => i.BadReason is not null) + plan.Skipped.Count;
        var summary = new RunSummary(
            good.Count, badCount, pairResults.Length,
            pairResults.Count(p => p.Analysis.Estimate.Status == PairStatus.Accepted),
            pairResults.Count(p => p.Analysis.Estimate.Status == PairStatus.Weak),
            pairResults.Count(p => p.Analysis.Estimate.Status == PairStatus.Rejected),
            incomplete);
        var manifest = new ManifestDocument
        {
            Run = runId,
            Set = set.SetId,
            Profile = set.Profile,
            Incomplete = incomplete,
            SettingsFingerprint = fingerprint,
            AlgorithmVersion = ctx.AlgorithmVersion,
            ToolVersion = ProcessingContext.ToolVersion,
            Engine = ctx.Engine.Name,
            Node = ctx.OutputNode,
            Images = good.Select(g => g.File.Key).ToArray(),
            Skipped = images.Where(i => i.BadReason is not null).Select(i => new ManifestSkipped(i.File.Key, i.BadReason!))
                .Concat(plan.Skipped.Select(s => new ManifestSkipped(s.Key, s.Reason))).ToArray(),
            Counts = new ManifestCounts(summary.Images, summary.BadFiles, summary.Pairs, summary.Accepted, summary.Weak, summary.Rejected),
            Files = entries.OrderBy(e => e.Path, StringComparer.Ordinal).ToArray(),
            Alignment = aligned.Manifest,
        };
        // The manifest goes last: once it names this run, every file it lists is complete and durable.
        foreach (var folder in entries.Select(e => Path.GetDirectoryName(OutputLayout.Full(setFolder, e.Path))!).Distinct(StringComparer.Ordinal))
        {
            AtomicFile.SyncDirectory(folder);
        }
        AtomicFile.WriteAllBytes(Path.Combine(setFolder, OutputLayout.ManifestName), OutputJson.Manifest(manifest));
        RemoveUnlisted(setFolder, manifest, set);

        var fileOutcomes = images.Select(i => new FileOutcome(i.File.RootPath, i.File.Size, i.File.MtimeTicks, i.Hash, i.Decoded, i.BadReason)).ToList();
        var pairRows = pairResults.Select(p => new PairResultRecord(good[p.A].File.Key, good[p.B].File.Key, StatusName(p.Analysis.Estimate.Status),
            p.Analysis.Estimate.InlierIndices.Length, p.Analysis.Estimate.MatchCount, string.Join("; ", p.Analysis.Estimate.Reasons))).ToList();
        ctx.Store.FinishRun(runId, set.SetId, fingerprint, set.InputsDigest(), summary, pairRows, fileOutcomes);
        return new SetOutcome(set.SetId, SetOutcomeKind.Done, runId, summary, null);
    }

    /// <summary>Places the set's images in one reference frame and builds the preview and report (see docs on toReference).</summary>
    private AlignmentStageResult AlignSet(SetInputs set, Settings.ProfileSettings profile, string fingerprint, long runId,
        List<ImageResult> good, PairResult[] pairResults)
    {
        var images = good.Select(g => new AlignedImage(g.File.Key, g.Analysis!.Size)).ToList();
        var pairs = pairResults.Select(p => new AlignedPair(p.A, p.B, p.Analysis.Estimate, p.Analysis.TiePoints)).ToList();
        // The preview decodes every placed image once more, in colour and downscaled: reserve the
        // decode in the shared memory budget like any other decode.
        var paths = good.Select(g => g.File.FullPath).ToList();
        var files = new PreviewFiles(paths);
        return SetAlignmentStage.Run(set.SetId, runId.ToString(CultureInfo.InvariantCulture), fingerprint, images, paths, pairs,
            profile.Estimation.MotionModel, profile.Alignment,
            (i, side) =>
            {
                long bytes = 4L * images[i].Size.Width * images[i].Size.Height;
                using var reservation = ctx.Budget.Reserve(bytes, CancellationToken.None);
                return files.Open(i, side);
            });
    }

    /// <summary>Rig check of a <c>frames</c> set, in plan order (deterministic): a deviating accepted pair becomes weak with the reason.</summary>
    private void ReviewPairs(IPairReview review, SetInputs set, Settings.ProfileSettings profile, List<ImageResult> good, PairResult[] pairResults)
    {
        string setId = set.SetId;
        for (int k = 0; k < pairResults.Length; k++)
        {
            var pr = pairResults[k];
            var est = pr.Analysis.Estimate;
            string keyA = good[pr.A].File.Key, keyB = good[pr.B].File.Key;
            if (est is { Status: PairStatus.Accepted, Transform: { } t }
                && review.ReviewAccepted(set.Profile, profile, setId, keyA, keyB, t, good[pr.A].Analysis!.Size) is { } reason)
            {
                est = est with { Status = PairStatus.Weak, Reasons = [.. est.Reasons, reason] };
                pairResults[k] = pr with { Analysis = pr.Analysis with { Estimate = est } };
            }
            ctx.Observer.PairDone(setId, keyA, keyB, est.Status, est.Reasons);
        }
    }

    private static ManifestEntry Write(string setFolder, string relative, string kind, byte[] bytes)
    {
        AtomicFile.WriteAllBytes(OutputLayout.Full(setFolder, relative), bytes, syncDirectory: false);
        return new ManifestEntry(relative, kind, Convert.ToHexStringLower(SHA256.HashData(bytes)));
    }

    /// <summary>After the manifest: removes our sidecars and tie points that the new manifest does not list (removed images, dropped pairs).</summary>
    private static void RemoveUnlisted(string setFolder, ManifestDocument manifest, SetInputs set)
    {
        var listed = new HashSet<string>(manifest.Files.Select(f => f.Path), StringComparer.Ordinal);
        var candidates = new List<string>();
        string ties = Path.Combine(setFolder, OutputLayout.TiesFolder);
        if (Directory.Exists(ties))
        {
            candidates.AddRange(Directory.EnumerateFiles(ties, "*.json"));
        }
        string preview = Path.Combine(setFolder, SetVisuals.PreviewFileName);
        if (File.Exists(preview))
        {
            candidates.Add(preview);
        }
        if (Directory.Exists(setFolder))
        {
            bool deep = set.Files.Any(f => f.Key.Contains('/', StringComparison.Ordinal));
            candidates.AddRange(Directory.EnumerateFiles(setFolder, "*" + OutputLayout.SidecarSuffix, deep ? SearchOption.AllDirectories : SearchOption.TopDirectoryOnly));
        }
        foreach (var full in candidates)
        {
            string rel = Path.GetRelativePath(setFolder, full).Replace('\\', '/');
            if (!listed.Contains(rel))
            {
                File.Delete(full);
            }
        }
    }

    private static string HashFile(string path)
    {
        // Read-only, sharing everything: the producer may still hold the file, and we never block or change it.
        using var fs = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete, 1 << 16);
        return Convert.ToHexStringLower(SHA256.HashData(fs));
    }

    public static string StatusName(PairStatus s) => s switch
    {
        PairStatus.Accepted => "accepted",
        PairStatus.Weak => "weak",
        _ => "rejected",
    };

    private static ConfidenceRecord FileRecord(string set, long run, string fp, string key, string reason) => new()
    {
        Kind = "file",
        Run = run,
        Set = set,
        ImageA = key,
        ImageB = null,
        Status = "bad-file",
        InlierCount = 0,
        MatchCount = 0,
        Homography = null,
        MotionModel = "",
        CornerSigmaPx = 0,
        RmsResidualPx = 0,
        Consensus = null,
        Seed = 0,
        Reasons = [reason],
        TimingsMs = new ConfidenceTimings(0, 0, 0, 0, 0),
        SettingsFingerprint = fp,
    };

    private static ConfidenceRecord PairRecord(string set, long run, string fp, string a, string b, PairResult pr)
    {
        var e = pr.Analysis.Estimate;
        return new ConfidenceRecord
        {
            Kind = "pair",
            Run = run,
            Set = set,
            ImageA = a,
            ImageB = b,
            Status = StatusName(e.Status),
            InlierCount = e.InlierIndices.Length,
            MatchCount = e.MatchCount,
            Homography = e.Transform?.ToRows(),
            MotionModel = e.Model.ToString().ToLowerInvariant(),
            CornerSigmaPx = OutputNumbers.FiniteOrNull(e.CornerSigmaPx),
            RmsResidualPx = OutputNumbers.FiniteOrNull(e.RmsResidualPx),
            Consensus = new ConfidenceConsensus(e.Consensus.Sampling, e.Consensus.Refined, e.Consensus.Final, e.Consensus.RunnerUp, e.LpCount, e.Iterations),
            Seed = e.Seed,
            Reasons = e.Reasons,
            TimingsMs = new ConfidenceTimings(e.TimingsMs.Sampling, e.TimingsMs.Refinement, e.TimingsMs.Polish, e.TimingsMs.Total, pr.PairMs),
            SettingsFingerprint = fp,
        };
    }
}
