using System.Security.Cryptography;
using Seamwright.Pipeline.Alignment;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Sets;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// Stage 4, publishing: stages every document (written and flushed under its temporary name),
/// renames them all over their targets, appends the confidence records, syncs the folders, writes
/// the manifest last, removes our files the new manifest no longer lists, and records the run in
/// the ledger in one transaction. A crash at any moment leaves either the previous manifest (and
/// its files) or the new one. On a shared ledger the node's claim is checked (and extended) twice:
/// before the set's output folder is touched, and after staging, before anything a reader sees
/// changes; a node that lost its claim publishes nothing, not even a sidecar.
/// </summary>
public sealed class SetPublisher(ProcessingContext ctx)
{
    public SetOutcome Publish(SetRun run, IReadOnlyList<AnalysedImage> all, PairStageResult pairs, AlignmentStageResult aligned, DateTime writtenUtc)
    {
        string time = OutputNumbers.UtcTime(writtenUtc);
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(aligned);
        EnsureClaim(run, "before writing anything");
        var stamp = OutputStamp.Of(ctx);
        string setFolder = OutputLayout.SetFolder(ctx.OutputRoot, run.SetId);
        var staged = StageAll(setFolder, SetDocuments.Build(run, stamp, pairs, aligned));
        try
        {
            var records = RunRecords.Confidence(run, all, pairs, time);
            if (ctx.OutputNode is { } node)
            {
                records = records.Select(r => r with { Node = node }).ToList();
            }
            // The lease now runs a whole lease from here: the renames, records and manifest take far less.
            EnsureClaim(run, "before publishing");
            foreach (var (file, _) in staged)
            {
                file.Commit();
            }
            var entries = staged.Select(s => s.Entry).ToArray();
            ctx.Log.Append(records);
            var summary = SetManifest.Summary(run, all, pairs);
            var manifest = SetManifest.Build(run, stamp, all, pairs, summary, aligned.Manifest, entries, time) with { Node = ctx.OutputNode };
            WriteManifestLast(setFolder, entries, manifest);
            RemoveUnlisted(setFolder, manifest, run.Set);
            ctx.Store.FinishRun(run.RunId, run.SetId, run.Fingerprint, run.Set.InputsDigest(), summary, RunRecords.PairRows(pairs), RunRecords.FileOutcomes(all));
            return new SetOutcome(run.SetId, SetOutcomeKind.Done, run.RunId, summary, null);
        }
        finally
        {
            foreach (var (file, _) in staged)
            {
                file.Dispose(); // deletes what was not committed
            }
        }
    }

    /// <summary>A node that lost its claim (a lease that ran out while it was cut off or slow) publishes nothing.</summary>
    private void EnsureClaim(SetRun run, string when)
    {
        if (ctx.Store.IsShared && !ctx.Store.HoldsClaim(run.SetId, ctx.NodeName, ctx.LeaseMilliseconds))
        {
            throw new LeaseLostException($"this node ({ctx.NodeName}) lost its claim on the set {when}; another node redoes it");
        }
    }

    private static (StagedFile File, ManifestEntry Entry)[] StageAll(string setFolder, IReadOnlyList<OutputFile> files)
    {
        // Each file is flushed to disk under its temporary name; several at once let the file system
        // commit their journal entries together (one fsync each, far fewer waits).
        var staged = new (StagedFile File, ManifestEntry Entry)[files.Count];
        try
        {
            Parallel.For(0, files.Count, new ParallelOptions { MaxDegreeOfParallelism = 8 }, i => staged[i] = Stage(setFolder, files[i]));
        }
        catch
        {
            foreach (var s in staged)
            {
                s.File?.Dispose();
            }
            throw;
        }
        return staged;
    }

    /// <summary>Encodes one document, stages it and keeps only its hash: at most the writers' documents are in memory at once.</summary>
    private static (StagedFile, ManifestEntry) Stage(string setFolder, OutputFile file)
    {
        byte[] bytes = file.Encode();
        var staged = AtomicFile.Stage(OutputLayout.Full(setFolder, file.Relative), bytes);
        return (staged, new ManifestEntry(file.Relative, file.Kind, Convert.ToHexStringLower(SHA256.HashData(bytes))));
    }

    /// <summary>The manifest goes last: once it names this run, every file it lists is complete and durable.</summary>
    private static void WriteManifestLast(string setFolder, IReadOnlyList<ManifestEntry> entries, ManifestDocument manifest)
    {
        foreach (var folder in entries.Select(e => Path.GetDirectoryName(OutputLayout.Full(setFolder, e.Path))!).Distinct(StringComparer.Ordinal))
        {
            AtomicFile.SyncDirectory(folder);
        }
        AtomicFile.WriteAllBytes(Path.Combine(setFolder, OutputLayout.ManifestName), OutputJson.Manifest(manifest));
    }

    /// <summary>After the manifest: removes our sidecars and tie points that the new manifest does not list (removed images, dropped pairs).</summary>
    public static void RemoveUnlisted(string setFolder, ManifestDocument manifest, SetInputs set)
    {
        ArgumentNullException.ThrowIfNull(manifest);
        ArgumentNullException.ThrowIfNull(set);
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
}
