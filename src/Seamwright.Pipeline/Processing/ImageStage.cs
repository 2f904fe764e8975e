using System.Security.Cryptography;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Processing;

/// <summary>One input image after the image stage: its digest and analysis, or the reason it is bad.</summary>
public sealed class AnalysedImage
{
    public required InputFile File { get; init; }
    public string? Hash { get; set; }
    public ImageAnalysis? Analysis { get; set; }
    /// <summary>True when the file was decoded in this run (not served from the feature cache).</summary>
    public bool Decoded { get; set; }
    public string? BadReason { get; set; }

    public string Key => File.Key;
}

/// <summary>
/// Stage 1, images: hash every input (read-only), take its summary from the feature cache (size,
/// coarse signature, capture time; the features stay on disk until a pair needs them) or analyse it, record a bad file with its reason; then check no input changed meanwhile.
/// </summary>
public sealed class ImageStage(ProcessingContext ctx)
{
    /// <summary>Every input of the set in catalogue order. Throws <see cref="InputsChangedException"/> when one changed or vanished.</summary>
    public AnalysedImage[] Run(SetRun run, CancellationToken cancel)
    {
        ArgumentNullException.ThrowIfNull(run);
        string featureFp = SettingsFingerprint.ForFeatures(run.Profile.Features, ctx.Engine.Name, ctx.Engine.DescriptorVersion);
        var results = run.Set.Files.Select(f => new AnalysedImage { File = f }).ToArray();
        Parallel.ForEach(results, new ParallelOptions { MaxDegreeOfParallelism = run.Plan.MaxParallelJobs, CancellationToken = cancel }, r =>
        {
            ctx.JobSlots.Wait(cancel);
            try
            {
                AnalyseOne(run, r, featureFp, cancel);
            }
            finally
            {
                ctx.JobSlots.Release();
            }
        });
        EnsureUnchanged(run.Set);
        return results;
    }

    private void AnalyseOne(SetRun run, AnalysedImage r, string featureFp, CancellationToken cancel)
    {
        r.Hash = TryHash(r);
        if (r.BadReason is null)
        {
            if (ctx.Cache.TryGetSummary(r.Hash!, featureFp, out var cached))
            {
                r.Analysis = cached;
            }
            else
            {
                Analyse(run, r, featureFp, cancel);
            }
        }
        if (r.BadReason is not null)
        {
            ctx.Observer.BadFile(run.SetId, r.Key, r.BadReason);
        }
        else
        {
            ctx.Observer.ImageDone(run.SetId, r.Key, !r.Decoded);
        }
    }

    private void Analyse(SetRun run, AnalysedImage r, string featureFp, CancellationToken cancel)
    {
        try
        {
            var analysis = ctx.Engine.Analyze(r.File.FullPath, run.Profile.Features, run.Plan.Limits, ctx.Budget, cancel);
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

    private static string? TryHash(AnalysedImage r)
    {
        try
        {
            return HashFile(r.File.FullPath);
        }
        catch (Exception e) when (e is FileNotFoundException or DirectoryNotFoundException)
        {
            throw new InputsChangedException($"{r.Key} vanished while the set was being processed");
        }
        catch (IOException e)
        {
            r.BadReason = "the file cannot be read: " + e.Message;
        }
        catch (UnauthorizedAccessException e)
        {
            r.BadReason = "no permission to read the file: " + e.Message;
        }
        return null;
    }

    /// <summary>A file that changed during the run makes the run's results describe nothing real: abandon and wait.</summary>
    public static void EnsureUnchanged(SetInputs set)
    {
        ArgumentNullException.ThrowIfNull(set);
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

    public static string HashFile(string path)
    {
        // Read-only, sharing everything: the producer may still hold the file, and we never block or change it.
        using var fs = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite | FileShare.Delete, 1 << 16);
        return Convert.ToHexStringLower(SHA256.HashData(fs));
    }
}
