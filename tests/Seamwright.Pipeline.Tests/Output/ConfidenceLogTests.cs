using Seamwright.Pipeline.Output;
using Seamwright.Tests.Support;

namespace Seamwright.Pipeline.Tests.Output;

public class ConfidenceLogTests
{
    private static ConfidenceRecord Record(long run, string a) => new()
    {
        Kind = "pair", Run = run, Time = "2026-12-01T00:00:00.000Z", Set = "s", ImageA = a, ImageB = "b", Status = "accepted", InlierCount = 10, MatchCount = 12,
        Homography = [[1, 0, 0], [0, 1, 0], [0, 0, 1]], MotionModel = "homography", FeaturePath = "corners", CornerSigmaPx = 0.1, RmsResidualPx = 0.5,
        Consensus = new ConfidenceConsensus(9, 10, 10, 0, 3, 100), Seed = "7", Reasons = [], TimingsMs = new ConfidenceTimings(1, 2, 3, 6, 7),
        SettingsFingerprint = "abc",
    };

    [Fact]
    public void Open_TornLastLine_IsDroppedAndWholeRecordsKept()
    {
        using var dir = new ScratchFolder();
        var log = new ConfidenceLog(dir.Path);
        log.Append([Record(1, "a1"), Record(1, "a2")]);
        File.AppendAllText(log.Path, "{\"schema\":\"seamwright.confidence.v1\",\"kind\":\"pa"); // a crash mid-append
        var reopened = new ConfidenceLog(dir.Path);
        Assert.True(reopened.DroppedBytes > 0);
        var all = ConfidenceLog.ReadAll(reopened.Path);
        Assert.Equal(new[] { "a1", "a2" }, all.Select(r => r.ImageA));
        reopened.Append([Record(2, "a3")]);
        Assert.Equal(3, ConfidenceLog.ReadAll(reopened.Path).Count);
    }

    [Fact]
    public void Append_Record_HasTheFieldsTheIssueNames()
    {
        using var dir = new ScratchFolder();
        var log = new ConfidenceLog(dir.Path);
        log.Append([Record(4, "x")]);
        using var doc = System.Text.Json.JsonDocument.Parse(File.ReadAllLines(log.Path)[0]);
        foreach (var field in new[] { "run", "set", "imageA", "imageB", "status", "inlierCount", "matchCount", "homography", "reasons", "timingsMs", "settingsFingerprint" })
        {
            Assert.True(doc.RootElement.TryGetProperty(field, out _), "missing " + field);
        }
    }
}
