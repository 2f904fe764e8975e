using System.Text.RegularExpressions;
using Seamwright.Pipeline.Report;
using Seamwright.Tests.Shared;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.Report;

/// <summary>What a reader sees on the report's first screen: explanations that read as sentences, quiet zero counts.</summary>
public sealed partial class ReportFirstScreenTests(ITestOutputHelper output)
{
    /// <summary>Most lines an Alignment panel value may wrap into on a 1280 px wide window (judgement: a sentence or two).</summary>
    private const int MostLines = 4;

    [Fact]
    public void Render_NoWeakPairs_ZeroCountChipIsQuiet()
    {
        var report = WithoutWeak(ReportSample.Build(out _));
        string header = Header().Match(ReportHtml.Render(report)).Value;

        Assert.Contains("<span class=\"chip st-weak zero\">0 weak</span>", header, StringComparison.Ordinal);
        Assert.Matches("<span class=\"chip st-accepted\">[1-9][0-9]* accepted</span>", header);
        Assert.Matches("<span class=\"chip st-rejected\">1 rejected</span>", header);
    }

    [Fact]
    public async Task Render_FirstScreenAt1280x900_ExplanationsReadAsSentencesAndZeroCountsQuiet()
    {
        string? chromium = HeadlessChromium.Find();
        if (chromium is null)
        {
            Assert.False(RepoPaths.IsCi, "chromium is not installed, and CI=true requires the browser test (apt-get install chromium)");
            output.WriteLine("SKIPPED: chromium is not installed (apt-get install chromium); the report's layout was not checked.");
            return;
        }
        var report = WithoutWeak(ReportSample.Build(out _, withSetModel: true));
        // The sample's set-model reason is a long one: it gives the GRIC figures of every planar model.
        Assert.Contains(report.Facts, f => f.Value.Contains("GRIC", StringComparison.Ordinal) && f.Value.Length > 150);
        string folder = Path.Combine(Path.GetTempPath(), "seamwright-report-" + Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(folder);
        try
        {
            string file = Path.Combine(folder, "report.html");
            await File.WriteAllTextAsync(file, ReportHtml.Render(report));
            await using var browser = await HeadlessChromium.StartAsync(chromium);
            await browser.SetViewportAsync(1280, 900);
            await browser.NavigateAsync(new Uri(file).AbsoluteUri);

            // Lines of each value of the Alignment panel: its height over its line height.
            var lines = (await browser.EvaluateAsync("""
                Array.from(Array.from(document.querySelectorAll('section')).filter(s => s.querySelector('h2')?.textContent === 'Alignment')[0]
                  .querySelectorAll('dd')).map(d => [d.previousElementSibling.textContent,
                    Math.round(d.getBoundingClientRect().height / parseFloat(getComputedStyle(d).lineHeight))])
                """))!.AsArray().Select(n => (Label: n![0]!.GetValue<string>(), Lines: n[1]!.GetValue<int>())).ToList();
            output.WriteLine(string.Join("\n", lines.Select(l => $"{l.Label}: {l.Lines} lines")));
            Assert.True(lines.Count >= 10, "the Alignment panel lists the set model, its reason and the alignment figures");
            Assert.All(lines, l => Assert.True(l.Lines <= MostLines, $"'{l.Label}' wraps into {l.Lines} lines at 1280 px"));

            // Zero counts in the header read as quiet (the subtitle's colour), counts above zero keep their status colour.
            async Task<string> Colour(string selector) =>
                (await browser.EvaluateAsync($"getComputedStyle(document.querySelector('{selector}')).color"))!.GetValue<string>();
            string quiet = await Colour("header .sub");
            Assert.Equal(quiet, await Colour("header .chip.st-weak"));
            Assert.NotEqual(quiet, await Colour("header .chip.st-accepted"));
            Assert.NotEqual(quiet, await Colour("header .chip.st-rejected"));
            Assert.Empty(browser.Errors);
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }

    private static SetReport WithoutWeak(SetReport report) => report with { Pairs = [.. report.Pairs.Where(p => p.Status != "weak")] };

    [GeneratedRegex("<header>.*?</header>", RegexOptions.Singleline)]
    private static partial Regex Header();
}
