using Seamwright.Pipeline.Output;
using Seamwright.Pipeline.Processing;

namespace Seamwright.Tests.Support;

/// <summary>Checks of an output root that every reliability test shares.</summary>
internal static class OutputChecks
{
    /// <summary>Every JSON output parses (a reader never sees a torn file); returns how many were checked.</summary>
    public static int AllOutputsParse(string outputRoot)
    {
        int n = 0;
        foreach (var f in Directory.EnumerateFiles(outputRoot, "*.json", SearchOption.AllDirectories))
        {
            if (f.Contains(Path.DirectorySeparatorChar + ".seamwright" + Path.DirectorySeparatorChar, StringComparison.Ordinal))
            {
                continue;
            }
            using var doc = System.Text.Json.JsonDocument.Parse(File.ReadAllBytes(f));
            n++;
        }
        return n;
    }

    public static string[] Temporaries(string outputRoot) =>
        Directory.EnumerateFiles(outputRoot, "*" + AtomicFile.TempSuffix, SearchOption.AllDirectories).ToArray();

    /// <summary>
    /// The newest manifest of a set lists a complete run: every listed file exists with the listed
    /// digest and names the manifest's run. Returns the manifest.
    /// </summary>
    public static ManifestDocument ManifestIsComplete(string setOutputFolder)
    {
        var m = OutputJson.ReadManifest(Path.Combine(setOutputFolder, OutputLayout.ManifestName));
        foreach (var e in m.Files)
        {
            string full = OutputLayout.Full(setOutputFolder, e.Path);
            Assert.True(File.Exists(full), $"manifest of {m.Set} lists missing {e.Path}");
            Assert.Equal(e.Sha256, Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(File.ReadAllBytes(full))));
            switch (e.Kind)
            {
                case "preview":
                    byte[] jpeg = File.ReadAllBytes(full);
                    Assert.True(jpeg.Length > 4 && jpeg[0] == 0xFF && jpeg[1] == 0xD8 && jpeg[^2] == 0xFF && jpeg[^1] == 0xD9, $"{e.Path} is not a whole JPEG");
                    break;
                case "report":
                    string html = File.ReadAllText(full);
                    Assert.True(html.StartsWith("<!DOCTYPE html>", StringComparison.Ordinal) && html.TrimEnd().EndsWith("</html>", StringComparison.Ordinal), $"{e.Path} is not a whole page");
                    Assert.Contains($"<code>{m.Run}</code>", html, StringComparison.Ordinal);
                    break;
                default:
                    long run = e.Kind == "sidecar" ? OutputJson.ReadSidecar(full).Run : OutputJson.ReadTiePoints(full).Run;
                    Assert.Equal(m.Run, run);
                    break;
            }
        }
        return m;
    }
}
