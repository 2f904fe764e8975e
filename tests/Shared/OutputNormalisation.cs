using System.Text.RegularExpressions;

namespace Seamwright.Tests.Shared;

/// <summary>
/// The one place tests blank what legitimately differs between two runs of the same inputs: the
/// report's volatile spans (input folder, written time; marked by
/// <c>src/Seamwright.Pipeline/Report/ReportVerdict.cs</c>), the report's run labels, and the run
/// number and written time in JSON text. Used by the golden demo comparison, the pair-reuse
/// comparison and the one-node versus three-node comparison.
/// </summary>
internal static partial class OutputNormalisation
{
    /// <summary>Opening mark of a volatile span (equal to ReportVerdict.VolatileStart, checked by a Pipeline test).</summary>
    public const string VolatileStart = "<!--volatile-->";

    /// <summary>Closing mark of a volatile span (equal to ReportVerdict.VolatileEnd).</summary>
    public const string VolatileEnd = "<!--/volatile-->";

    /// <summary>The text with every volatile span, marks included, replaced by <paramref name="replacement"/>.</summary>
    public static string WithoutVolatileSpans(string text, string replacement = "") => VolatileSpan().Replace(text, replacement);

    /// <summary>The report's run labels (run ids in code, "run N" before a tag, "N, written") replaced by RUN.</summary>
    public static string WithoutRunLabels(string html) =>
        WrittenRun().Replace(RunBeforeTag().Replace(CodeNumber().Replace(html, "<code>RUN</code>"), "run RUN"), "<dd>RUN, written");

    /// <summary>JSON text with its "run" numbers and "time" strings replaced (any spacing after the colon).</summary>
    public static string WithoutJsonRunAndTime(string json) => JsonTime().Replace(JsonRun().Replace(json, "\"run\":RUN"), "\"time\":TIME");

    /// <summary>Everything above, for text that may be JSON or a report.</summary>
    public static string Comparable(string text) => WithoutRunLabels(WithoutJsonRunAndTime(WithoutVolatileSpans(text, "VOLATILE")));

    [GeneratedRegex(@"<!--volatile-->.*?<!--/volatile-->", RegexOptions.Singleline | RegexOptions.CultureInvariant, 10_000)]
    private static partial Regex VolatileSpan();

    [GeneratedRegex(@"<code>[0-9]+</code>", RegexOptions.CultureInvariant)]
    private static partial Regex CodeNumber();

    [GeneratedRegex(@"run [0-9]+(?=<)", RegexOptions.CultureInvariant)]
    private static partial Regex RunBeforeTag();

    [GeneratedRegex(@"<dd>[0-9]+, written", RegexOptions.CultureInvariant)]
    private static partial Regex WrittenRun();

    [GeneratedRegex(@"""run"": ?[0-9]+", RegexOptions.CultureInvariant)]
    private static partial Regex JsonRun();

    [GeneratedRegex(@"""time"": ?""[^""]*""", RegexOptions.CultureInvariant)]
    private static partial Regex JsonTime();
}
