using Seamwright.Pipeline.Report;
using Seamwright.Tests.Shared;

namespace Seamwright.Pipeline.Tests.Report;

public sealed class OutputNormalisationTests
{
    [Fact]
    public void VolatileMarks_AreTheReportsOwn()
    {
        Assert.Equal(ReportVerdict.VolatileStart, OutputNormalisation.VolatileStart);
        Assert.Equal(ReportVerdict.VolatileEnd, OutputNormalisation.VolatileEnd);
    }

    [Fact]
    public void Comparable_TwoRunsDifferingOnlyInRunAndTime_Equal()
    {
        string a = "{\"run\": 3, \"time\": \"2026-12-03T08:00:00Z\", \"inliers\": 41}<dd>3, written <!--volatile-->/in/a<!--/volatile--></dd> run <code>3</code> run 3<br>";
        string b = "{\"run\":17,\"time\":\"2026-12-04T09:30:00Z\", \"inliers\": 41}<dd>17, written <!--volatile-->/in/b\n<!--/volatile--></dd> run <code>17</code> run 17<br>";

        Assert.Equal(OutputNormalisation.Comparable(a).Replace(" ", "", StringComparison.Ordinal), OutputNormalisation.Comparable(b).Replace(" ", "", StringComparison.Ordinal));
        Assert.NotEqual(OutputNormalisation.Comparable(a), OutputNormalisation.Comparable(a.Replace("41", "42", StringComparison.Ordinal)));
    }

    [Fact]
    public void WithoutVolatileSpans_DefaultReplacement_RemovesSpanAndMarks()
    {
        Assert.Equal("<dd></dd><dd>x</dd>", OutputNormalisation.WithoutVolatileSpans("<dd><!--volatile-->a\nb<!--/volatile--></dd><dd>x</dd>"));
    }
}
