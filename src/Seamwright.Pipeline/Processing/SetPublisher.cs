using System.Security.Cryptography;
using Seamwright.Pipeline.Alignment;
using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Sets;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// Stage 4, publishing: writes every document atomically (each flushed before its rename), appends
/// the confidence records, syncs the folders, writes the manifest last, removes our files the new
/// manifest no longer lists, and records the run in the ledger in one transaction. A crash at any
/// moment leaves either the previous manifest (and its files) or the new one.
/// </summary>
public sealed class SetPublisher(ProcessingContext ctx)
{
    public SetOutcome Publish(SetRun run, IReadOnlyList<AnalysedImage> all, PairStageResult pairs, AlignmentStageResult aligned, DateTime writtenUtc)
    {
        string time = OutputNumbers.UtcTime(writtenUtc);
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(aligned);
        var stamp = OutputStamp.Of(ctx);
        string setFolder = OutputLayout.SetFolder(ctx.OutputRoot, run.SetId);
        var entries = WriteAll(setFolder, SetDocuments.Build(run, stamp, pairs, aligned));
        var records = RunRecords.Confidence(run, all, pairs, time);
        if (ctx.OutputNode is { } node)
        {
            records = records.Select(r => r with { Node = node }).ToList();
        }
        // A node that lost its claim (a lease that ran out while it was cut off) publishes nothing.
        if (ctx.Store.IsShared && !ctx.Store.HoldsClaim(run.SetId, ctx.NodeName, ctx.LeaseMilliseconds))
        {
            throw new LeaseLostException($"this node ({ctx.NodeName}) lost its claim on the set before publishing; another node redoes it");
        }
        ctx.Log.Append(records);
        var summary = SetManifest.Summary(run, all, pairs);
        var manifest = SetManifest.Build(run, stamp, all, pairs, summary, aligned.Manifest, entries, time) with { Node = ctx.OutputNode };
        WriteManifestLast(setFolder, entries, manifest);
        RemoveUnlisted(setFolder, manifest, run.Set);
        ctx.Store.FinishRun(run.RunId, run.SetId, run.Fingerprint, run.Set.InputsDigest(), summary, RunRecords.PairRows(pairs), RunRecords.FileOutcomes(all));
        return new SetOutcome(run.SetId, SetOutcomeKind.Done, run.RunId, summary, null);
    }

    private static ManifestEntry[] WriteAll(string setFolder, IReadOnlyList<OutputFile> files)
    {
        // Each file is flushed to disk before its rename; several at once let the file system
        // commit their journal entries together (one fsync each, far fewer waits).
        var entries = new ManifestEntry[files.Count];
        Parallel.For(0, files.Count, new ParallelOptions { MaxDegreeOfParallelism = 8 }, i => entries[i] = Write(setFolder, files[i]));
        return entries;
    }

    /// <summary>Encodes one document, writes it and keeps only its hash: at most the writers' documents are in memory at once.</summary>
    private static ManifestEntry Write(string setFolder, OutputFile file)
    {
        byte[] bytes = file.Encode();
        AtomicFile.WriteAllBytes(OutputLayout.Full(setFolder, file.Relative), bytes, syncDirectory: false);
        return new ManifestEntry(file.Relative, file.Kind, Convert.ToHexStringLower(SHA256.HashData(bytes)));
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
