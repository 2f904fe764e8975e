using System.Security.Cryptography;
using System.Text;
using System.Text.Json;
using System.Text.Json.Nodes;
using Seamwright.Host.Commands;
using Seamwright.Tests.Shared;
using Seamwright.Tests.Support;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Golden;

/// <summary>
/// Guards the demo outputs byte for byte: the main job (`run`) on `sample-folder/`, in-process,
/// into a temporary output root; every output file's SHA-256 (relative path -> digest) is compared
/// with the committed `demo-outputs.json`. Normalised before hashing, because they measure time
/// or name where the run happened: the `timingsMs` object and the `time` of each
/// `confidence.jsonl` record; the manifests' `time` and the SHA-256 they list for `report.html`;
/// in `report.html` what `ReportVerdict` marks volatile (the input folder and the time). Left out: `.seamwright/` (the
/// ledger, logs and feature cache: internal state, not outputs). Everything else (sidecars, tie
/// points, manifests, preview, report) is hashed as written.
/// A change that alters results on purpose regenerates the golden in the same commit:
/// <c>SEAMWRIGHT_WRITE_GOLDEN=1 dotnet test tests/Seamwright.Host.Tests --filter DemoGolden</c>.
/// </summary>
public sealed class DemoGoldenTests(ITestOutputHelper output)
{
    private const string GoldenName = "demo-outputs.json";

    private static string GoldenPath => Path.Combine(RepoPaths.Root, "tests", "Seamwright.Host.Tests", "Golden", GoldenName);

    [Fact]
    public void Run_SampleFolder_OutputsMatchGoldenWithOneOrTwoJobs()
    {
        string sample = Path.Combine(RepoPaths.Root, "sample-folder");
        Assert.True(Directory.Exists(sample), "sample-folder is missing from the repository");
        using var dir = new ScratchFolder();

        var twoJobs = RunDemo(sample, dir.Sub("out2"), jobs: 2);
        var oneJob = RunDemo(sample, dir.Sub("out1"), jobs: 1);

        // Determinism across the number of workers, independent of the committed golden.
        Assert.Equal(Render(twoJobs), Render(oneJob));
        if (Environment.GetEnvironmentVariable("SEAMWRIGHT_WRITE_GOLDEN") == "1")
        {
            File.WriteAllText(GoldenPath, Render(twoJobs));
            output.WriteLine($"Wrote {GoldenPath} ({twoJobs.Count} files)");
            return;
        }
        Assert.True(File.Exists(GoldenPath), $"no golden at {GoldenPath}; create it with SEAMWRIGHT_WRITE_GOLDEN=1");
        var golden = JsonSerializer.Deserialize<SortedDictionary<string, string>>(File.ReadAllText(GoldenPath))!;
        var differences = golden.Keys.Union(twoJobs.Keys).Order(StringComparer.Ordinal)
            .Where(k => golden.GetValueOrDefault(k) != twoJobs.GetValueOrDefault(k))
            .Select(k => $"{k}: golden {golden.GetValueOrDefault(k) ?? "(absent)"}, now {twoJobs.GetValueOrDefault(k) ?? "(absent)"}")
            .ToList();
        Assert.True(differences.Count == 0,
            "demo outputs differ from the golden (if on purpose, regenerate with SEAMWRIGHT_WRITE_GOLDEN=1 and say so in the commit):"
            + Environment.NewLine + string.Join(Environment.NewLine, differences));
        output.WriteLine($"{golden.Count} output files identical to the golden");
    }

    private static SortedDictionary<string, string> RunDemo(string sample, string outRoot, int jobs)
    {
        string config = Path.Combine(RepoPaths.Root, "config", "appsettings.json");
        int code = OneShot.Execute(new OneShotRequest(sample, outRoot, config,
            [$"--Seamwright:Service:MaxParallelJobs={jobs}"], Within: null, DryRun: false, Force: false));
        Assert.Equal(ExitCodes.Ok, code);
        return HashOutputs(outRoot);
    }

    internal static SortedDictionary<string, string> HashOutputs(string outRoot)
    {
        var hashes = new SortedDictionary<string, string>(StringComparer.Ordinal);
        foreach (string full in Directory.EnumerateFiles(outRoot, "*", SearchOption.AllDirectories))
        {
            string rel = Path.GetRelativePath(outRoot, full).Replace('\\', '/');
            if (rel.StartsWith(".seamwright/", StringComparison.Ordinal))
            {
                continue;
            }
            byte[] bytes = rel == "confidence.jsonl" ? WithoutTimings(File.ReadAllLines(full))
                : rel.EndsWith("/seam-manifest.json", StringComparison.Ordinal) ? ManifestWithoutTime(File.ReadAllText(full))
                : rel.EndsWith("/report.html", StringComparison.Ordinal) ? ReportWithoutVolatile(File.ReadAllText(full))
                : File.ReadAllBytes(full);
            hashes[rel] = Convert.ToHexStringLower(SHA256.HashData(bytes));
        }
        return hashes;
    }

    /// <summary>Each record with its <c>timingsMs</c> (wall-clock measurements) removed; everything else kept in order.</summary>
    private static byte[] WithoutTimings(string[] lines)
    {
        var sb = new StringBuilder();
        foreach (string line in lines.Where(l => l.Length > 0))
        {
            var node = JsonNode.Parse(line)!.AsObject();
            node.Remove("timingsMs");
            node.Remove("time");
            sb.Append(node.ToJsonString()).Append('\n');
        }
        return Encoding.UTF8.GetBytes(sb.ToString());
    }

    private static byte[] ManifestWithoutTime(string json)
    {
        var node = JsonNode.Parse(json)!.AsObject();
        node.Remove("time");
        foreach (var f in node["files"]!.AsArray())
        {
            if (f!["kind"]!.GetValue<string>() == "report")
            {
                f["sha256"] = "";
            }
        }
        return Encoding.UTF8.GetBytes(node.ToJsonString());
    }

    private static byte[] ReportWithoutVolatile(string html) => Encoding.UTF8.GetBytes(OutputNormalisation.WithoutVolatileSpans(html));

    private static string Render(SortedDictionary<string, string> hashes) =>
        JsonSerializer.Serialize(hashes, new JsonSerializerOptions { WriteIndented = true, Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping }) + "\n";
}
