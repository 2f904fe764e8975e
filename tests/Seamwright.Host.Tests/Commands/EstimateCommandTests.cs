using System.Text.Json;
using Seamwright.Core.Geometry;
using Seamwright.Host.Commands;

namespace Seamwright.Host.Tests.Commands;

public class EstimateCommandTests
{
    private static (int Code, string Out, string Err) Run(params string[] args)
    {
        using var o = new StringWriter();
        using var e = new StringWriter();
        int code = EstimateCommand.Run(args, o, e);
        return (code, o.ToString(), e.ToString());
    }

    private static string TempFile(string content)
    {
        string path = Path.Combine(Path.GetTempPath(), "seamwright-test-" + Guid.NewGuid().ToString("N") + ".txt");
        File.WriteAllText(path, content);
        return path;
    }

    private static string WithoutTimings(string json)
    {
        using var doc = JsonDocument.Parse(json);
        var props = doc.RootElement.EnumerateObject().Where(p => p.Name != "timingsMs").Select(p => p.Name + "=" + p.Value.GetRawText());
        return string.Join("\n", props);
    }

    [Fact]
    public void Run_DemoFileJson_HasEveryContractField()
    {
        var (code, stdout, stderr) = Run(DemoMatchFile.Path, "--json");
        Assert.Equal(0, code);
        Assert.Equal("", stderr);
        using var doc = JsonDocument.Parse(stdout);
        var r = doc.RootElement;
        Assert.Equal("homography", r.GetProperty("model").GetString());
        var h = r.GetProperty("homography");
        Assert.Equal(3, h.GetArrayLength());
        Assert.All(h.EnumerateArray(), row => Assert.Equal(3, row.GetArrayLength()));
        Assert.Equal(1.0, h[2][2].GetDouble());
        Assert.Equal(400, r.GetProperty("matchCount").GetInt32());
        Assert.Equal(r.GetProperty("inlierCount").GetInt32(), r.GetProperty("inlierIndices").GetArrayLength());
        var c = r.GetProperty("consensus");
        foreach (string f in new[] { "sampling", "refined", "final", "runnerUp" })
        {
            Assert.True(c.GetProperty(f).GetInt32() >= 0);
        }
        Assert.Equal(3.0, r.GetProperty("threshold").GetDouble());
        Assert.Equal(1UL, r.GetProperty("seed").GetUInt64());
        Assert.Equal("accepted", r.GetProperty("status").GetString());
        Assert.Equal(JsonValueKind.Array, r.GetProperty("reasons").ValueKind);
        Assert.True(r.GetProperty("cornerSigmaPx").GetDouble() > 0);
        var t = r.GetProperty("timingsMs");
        foreach (string f in new[] { "sampling", "refinement", "polish", "total" })
        {
            Assert.True(t.GetProperty(f).GetDouble() >= 0);
        }
        // The demo's known transform (see DemoMatchFile): every corner within 2 px.
        var est = Transform2D.FromRows(h.EnumerateArray().Select(row => row.EnumerateArray().Select(v => v.GetDouble()).ToArray()).ToArray());
        Assert.True(Transform2D.MaxPointDistance(est, DemoMatchFile.Truth, Transform2D.Corners(3000, 2000)) < 2);
    }

    [Fact]
    public void Run_Repeated_IdenticalJsonAsideTimings()
    {
        string first = WithoutTimings(Run(DemoMatchFile.Path, "--json", "--seed", "7").Out);
        Assert.Equal(first, WithoutTimings(Run(DemoMatchFile.Path, "--json", "--seed", "7").Out));
    }

    [Fact]
    public void Run_UnderParallelLoad_IdenticalJsonAsideTimings()
    {
        string expected = WithoutTimings(Run(DemoMatchFile.Path, "--json").Out);
        var results = new string[6];
        Parallel.For(0, results.Length, new ParallelOptions { MaxDegreeOfParallelism = 3 }, i => results[i] = WithoutTimings(Run(DemoMatchFile.Path, "--json").Out));
        Assert.All(results, r => Assert.Equal(expected, r));
    }

    [Fact]
    public void Run_WithoutJson_PrintsSummary()
    {
        var (code, stdout, _) = Run(DemoMatchFile.Path, "--model", "affine", "--no-refine");
        Assert.Equal(0, code);
        Assert.StartsWith("affine from 400 matches", stdout, StringComparison.Ordinal);
        Assert.Contains("consensus: sampling", stdout, StringComparison.Ordinal);
    }

    [Fact]
    public void Run_OptionsAndSizes_AreReflected()
    {
        var (code, stdout, _) = Run(DemoMatchFile.Path, "--json", "--threshold", "2.5", "--seed", "42", "--size-a", "3000x2000", "--size-b", "3000x2000", "--model", "similarity", "--no-refine");
        Assert.Equal(0, code);
        using var doc = JsonDocument.Parse(stdout);
        var r = doc.RootElement;
        Assert.Equal("similarity", r.GetProperty("model").GetString());
        Assert.Equal(2.5, r.GetProperty("threshold").GetDouble());
        Assert.Equal(42UL, r.GetProperty("seed").GetUInt64());
        Assert.Equal(3000, r.GetProperty("sizeA").GetProperty("width").GetInt32());
        Assert.Equal(r.GetProperty("consensus").GetProperty("sampling").GetInt32(), r.GetProperty("consensus").GetProperty("refined").GetInt32());
    }

    [Fact]
    public void Run_HeaderlessWhitespaceFile_Accepted()
    {
        string path = TempFile("# comment\n0 0 10 10\n100 0 110 10\n0 100 10 110\n100 100 110 110\n50 50 60 60\n");
        try
        {
            var (code, stdout, _) = Run(path, "--json", "--model", "translation");
            Assert.Equal(0, code);
            using var doc = JsonDocument.Parse(stdout);
            Assert.Equal(5, doc.RootElement.GetProperty("matchCount").GetInt32());
            Assert.Equal(5, doc.RootElement.GetProperty("inlierCount").GetInt32());
        }
        finally
        {
            File.Delete(path);
        }
    }

    [Fact]
    public void Run_DegenerateButValidFile_ExitsZeroWithRejectedStatus()
    {
        string path = TempFile("x1,y1,x2,y2\n0,0,5,5\n10,10,15,15\n20,20,25,25\n30,30,35,35\n");
        try
        {
            var (code, stdout, _) = Run(path, "--json");
            Assert.Equal(0, code);
            using var doc = JsonDocument.Parse(stdout);
            Assert.Equal("rejected", doc.RootElement.GetProperty("status").GetString());
        }
        finally
        {
            File.Delete(path);
        }
    }

    [Theory]
    [InlineData("x1,y1,x2,y2\n1,2,3,4\n5,6,seven,8\n", ":3:", "not a number")]
    [InlineData("1,2,3,4\n5,6,NaN,8\n", ":2:", "not finite")]
    [InlineData("1,2,3,4\n5,6,7\n", ":2:", "expected 4 values")]
    [InlineData("1,2,3,4\n5,6,7,8\n", "2 matches", "needs at least 4")]
    public void Run_BadFile_ExitsTwoNamingFileLineAndReason(string content, string where, string reason)
    {
        string path = TempFile(content);
        try
        {
            var (code, stdout, stderr) = Run(path, "--json");
            Assert.Equal(2, code);
            Assert.Equal("", stdout);
            Assert.Contains(path, stderr, StringComparison.Ordinal);
            Assert.Contains(where, stderr, StringComparison.Ordinal);
            Assert.Contains(reason, stderr, StringComparison.Ordinal);
            Assert.Single(stderr.TrimEnd().Split('\n'));
        }
        finally
        {
            File.Delete(path);
        }
    }

    [Fact]
    public void Run_MissingFile_ExitsTwo()
    {
        var (code, _, stderr) = Run("/nonexistent/matches.txt");
        Assert.Equal(2, code);
        Assert.Contains("/nonexistent/matches.txt", stderr, StringComparison.Ordinal);
        Assert.Contains("cannot read", stderr, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("--model", "projective")]
    [InlineData("--threshold", "-1")]
    [InlineData("--seed", "x")]
    [InlineData("--size-a", "100")]
    [InlineData("--bogus", "1")]
    public void Run_BadArguments_ExitsTwo(string option, string value)
    {
        var (code, _, stderr) = Run(DemoMatchFile.Path, option, value);
        Assert.Equal(2, code);
        Assert.Contains(option, stderr, StringComparison.Ordinal);
    }
}
