using Seamwright.Core.Features;
using Seamwright.Tests.Shared;

namespace Seamwright.Core.Tests.Features;

public class DescriptorPatternTests
{
    private static string TablePath => Path.Combine(RepoPaths.Root, "src", "Seamwright.Core", "Features", "DescriptorPatternTable.cs");

    [Fact]
    public void GenerateSource_RerunFromSeed_ReproducesEmbeddedTableExactly()
    {
        string generated = DescriptorPatternGenerator.GenerateSource();
        if (Environment.GetEnvironmentVariable("SEAMWRIGHT_WRITE_PATTERN") == "1")
        {
            File.WriteAllText(TablePath, generated);
        }
        string embedded = File.ReadAllText(TablePath).ReplaceLineEndings("\n");
        Assert.True(generated == embedded,
            "The embedded descriptor pattern differs from the generator's output. If the change is intended, bump "
            + "DescriptorPattern.Version and regenerate with SEAMWRIGHT_WRITE_PATTERN=1.");
    }

    [Fact]
    public void Points_EmbeddedPattern_Has256DistinctTestsInsideTheDisc()
    {
        var p = DescriptorPattern.Points;
        Assert.Equal(1024, p.Length);
        var tests = new HashSet<(int, int, int, int)>();
        for (int i = 0; i < 256; i++)
        {
            int x1 = p[i * 4], y1 = p[i * 4 + 1], x2 = p[i * 4 + 2], y2 = p[i * 4 + 3];
            Assert.True(x1 * x1 + y1 * y1 <= 225 && x2 * x2 + y2 * y2 <= 225);
            Assert.True((x1, y1) != (x2, y2));
            Assert.True(tests.Add((x1, y1, x2, y2)));
        }
        Assert.Equal(DescriptorPattern.Version, DescriptorPatternTable.Version);
    }
}
