using Seamwright.Core.Geometry;
using Seamwright.Pipeline.Matches;

namespace Seamwright.Pipeline.Tests.Matches;

public class MatchFileReaderTests
{
    private static MatchFile Parse(string text) => MatchFileReader.Parse(new StringReader(text), "m.txt");

    [Fact]
    public void Parse_HeaderCommasAndSpaces_ReadsAllMatchesInOrder()
    {
        var f = Parse("x1, y1, x2, y2\n1,2,3,4\n\n# note\n5 6\t7 8\n9.5,10e0 ,11,12\n");
        Assert.Equal(new[] { new Correspondence(1, 2, 3, 4), new Correspondence(5, 6, 7, 8), new Correspondence(9.5, 10, 11, 12) }, f.Matches);
    }

    [Fact]
    public void Parse_Bounds_FollowPixelCentreConvention()
    {
        // A point at x = 99.2 lies in pixel 99, so the image is at least 100 wide; at 99.6 it is 101.
        var f = Parse("99.2,10,99.6,0\n");
        Assert.Equal(new ImageSize(100, 11), f.BoundsA);
        Assert.Equal(new ImageSize(101, 1), f.BoundsB);
    }

    [Theory]
    [InlineData("1,2,3,4\nx,2,3,4\n", 2, "not a number")]
    [InlineData("1,2,3,4\n1,2,3,Infinity\n", 2, "not finite")]
    [InlineData("1,2,3,4,5\n", 1, "expected 4 values")]
    [InlineData("a,b,c,d\ne,f,g,h\n", 2, "not a number")]
    public void Parse_BadLine_ThrowsWithLineAndReason(string text, int line, string reason)
    {
        var ex = Assert.Throws<MatchFileException>(() => Parse(text));
        Assert.Equal(line, ex.Line);
        Assert.Contains(reason, ex.Reason, StringComparison.Ordinal);
        Assert.StartsWith($"m.txt:{line}: ", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Read_MissingFile_ThrowsCannotRead()
    {
        var ex = Assert.Throws<MatchFileException>(() => MatchFileReader.Read("/nonexistent/x.txt"));
        Assert.Contains("cannot read", ex.Message, StringComparison.Ordinal);
    }
}
