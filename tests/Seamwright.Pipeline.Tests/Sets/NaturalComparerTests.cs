using Seamwright.Pipeline.Sets;

namespace Seamwright.Pipeline.Tests.Sets;

public class NaturalComparerTests
{
    [Fact]
    public void Compare_DigitRuns_CompareByValue()
    {
        var names = new[] { "img10.jpg", "img2.jpg", "img1.jpg", "IMG3.jpg", "img02.jpg" };
        var sorted = names.Order(NaturalComparer.Instance).ToArray();
        Assert.Equal(new[] { "img1.jpg", "img02.jpg", "img2.jpg", "IMG3.jpg", "img10.jpg" }, sorted);
    }
}
