using System.Text.RegularExpressions;
using Seamwright.Pipeline.Report;
using Seamwright.Tests.Shared;
using Xunit.Abstractions;

namespace Seamwright.Pipeline.Tests.Report;

public sealed partial class ReportHtmlTests(ITestOutputHelper output)
{
    [Fact]
    public void Render_SampleSet_SelfContainedAndDeterministic()
    {
        var report = ReportSample.Build(out _);
        string html = ReportHtml.Render(report);
        Assert.Equal(html, ReportHtml.Render(ReportSample.Build(out _)));
        // Self-contained: no external references of any kind.
        Assert.DoesNotMatch(ExternalReference(), html);
        Assert.Equal(report.Images.Count + 1, Regex.Matches(html, "src=\"data:image/jpeg;base64,").Count);
        Assert.Equal(report.Pairs.Count, Regex.Matches(html, "<tr data-i=").Count);
        Assert.Equal(report.Pairs.Count, Regex.Matches(html, "<line id=\"edge-").Count);
        Assert.Contains("fp-3f9c0a17", html, StringComparison.Ordinal);
        // Text from the data is escaped, never markup.
        Assert.DoesNotContain("<script>alert", html, StringComparison.Ordinal);
        Assert.Contains("estate-map &lt;north&gt;", html, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Render_SampleSet_WorksInHeadlessChromium()
    {
        string? chromium = HeadlessChromium.Find();
        if (chromium is null)
        {
            Assert.False(RepoPaths.IsCi, "chromium is not installed, and CI=true requires the browser test (apt-get install chromium)");
            output.WriteLine("SKIPPED: chromium is not installed (apt-get install chromium); the report was not checked in a browser.");
            return;
        }
        var report = ReportSample.Build(out _);
        string folder = Path.Combine(Path.GetTempPath(), "seamwright-report-" + Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(folder);
        try
        {
            string file = Path.Combine(folder, "report.html");
            await File.WriteAllTextAsync(file, ReportHtml.Render(report));
            await using var browser = await HeadlessChromium.StartAsync(chromium);
            await browser.NavigateAsync(new Uri(file).AbsoluteUri);
            var images = await browser.EvaluateAsync(
                "Promise.all(Array.from(document.images).map(i => i.decode().then(() => i.naturalWidth, () => 0)))");
            var widths = images!.AsArray().Select(n => n!.GetValue<int>()).ToList();
            Assert.Equal(report.Images.Count + 1, widths.Count);
            Assert.All(widths, w => Assert.True(w > 0, "an image did not load"));
            int rows = (await browser.EvaluateAsync("document.querySelectorAll('#pairs tbody tr').length"))!.GetValue<int>();
            Assert.Equal(report.Pairs.Count, rows);
            // Sorting by inliers (column 4) ascending, then descending.
            string inliers = "Array.from(document.querySelectorAll('#pairs tbody tr')).map(r => parseFloat(r.cells[3].getAttribute('data-v')))";
            await browser.EvaluateAsync("document.querySelectorAll('#pairs th button')[3].click()");
            var ascending = (await browser.EvaluateAsync(inliers))!.AsArray().Select(n => n!.GetValue<double>()).ToList();
            Assert.Equal(ascending.Order(), ascending);
            await browser.EvaluateAsync("document.querySelectorAll('#pairs th button')[3].click()");
            var descending = (await browser.EvaluateAsync(inliers))!.AsArray().Select(n => n!.GetValue<double>()).ToList();
            Assert.Equal(descending.OrderDescending(), descending);
            Assert.NotEqual(ascending, descending);
            Assert.Empty(browser.Errors);
            string? shot = Environment.GetEnvironmentVariable("SEAMWRIGHT_REPORT_SCREENSHOT");
            if (!string.IsNullOrEmpty(shot))
            {
                await File.WriteAllBytesAsync(shot, await browser.ScreenshotAsync());
                File.Copy(file, Path.ChangeExtension(shot, ".html"), overwrite: true);
            }
            output.WriteLine($"chromium: {widths.Count} images loaded (widths {string.Join(", ", widths)}), {rows} table rows, sorting works, no script errors");
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }

    [GeneratedRegex("(src|href)=\"(https?:|//|file:)|<link |@import|url\\(", RegexOptions.IgnoreCase)]
    private static partial Regex ExternalReference();
}
