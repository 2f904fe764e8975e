using Seamwright.Core.Imaging;

namespace Seamwright.Core.Tests.Imaging;

public class ExifOrientationTests
{
    // Stored 3 x 2 image:  1 2 3
    //                      4 5 6
    private static readonly GrayImage Stored = new(3, 2, [1, 2, 3, 4, 5, 6]);

    [Theory]
    // Expected displayed pixels from the EXIF definitions of tag 0x0112 (Exif 2.32, CIPA DC-008,
    // table of Orientation values): e.g. 6 = "the 0th row is the visual right-hand side, the
    // 0th column is the visual top".
    [InlineData(1, 3, new byte[] { 1, 2, 3, 4, 5, 6 })]
    [InlineData(2, 3, new byte[] { 3, 2, 1, 6, 5, 4 })]
    [InlineData(3, 3, new byte[] { 6, 5, 4, 3, 2, 1 })]
    [InlineData(4, 3, new byte[] { 4, 5, 6, 1, 2, 3 })]
    [InlineData(5, 2, new byte[] { 1, 4, 2, 5, 3, 6 })]
    [InlineData(6, 2, new byte[] { 4, 1, 5, 2, 6, 3 })]
    [InlineData(7, 2, new byte[] { 6, 3, 5, 2, 4, 1 })]
    [InlineData(8, 2, new byte[] { 3, 6, 2, 5, 1, 4 })]
    public void ToDisplay_EachOrientation_MatchesExifDefinition(int orientation, int displayWidth, byte[] expected)
    {
        var display = ExifOrientation.ToDisplay(Stored, orientation);
        Assert.Equal(displayWidth, display.Width);
        Assert.Equal(expected, display.Pixels);
        Assert.Equal(Stored.Pixels, ExifOrientation.ToStored(display, orientation).Pixels);
    }

    [Theory]
    [InlineData(0)]
    [InlineData(9)]
    public void ToDisplay_InvalidValue_TreatedAsUpright(int orientation) =>
        Assert.Same(Stored, ExifOrientation.ToDisplay(Stored, orientation));
}
