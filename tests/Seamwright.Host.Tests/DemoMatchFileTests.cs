namespace Seamwright.Host.Tests;

public class DemoMatchFileTests
{
    [Fact]
    public void DemoFile_Committed_EqualsGeneratorOutput()
    {
        string expected = DemoMatchFile.Generate();
        if (Environment.GetEnvironmentVariable("SEAMWRIGHT_WRITE_DEMO") == "1")
        {
            Directory.CreateDirectory(Path.GetDirectoryName(DemoMatchFile.Path)!);
            File.WriteAllText(DemoMatchFile.Path, expected);
        }
        Assert.True(File.Exists(DemoMatchFile.Path), "demo match file missing: " + DemoMatchFile.Path);
        Assert.Equal(expected, File.ReadAllText(DemoMatchFile.Path));
    }
}
