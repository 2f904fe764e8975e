namespace Seamwright.Host;

internal static class Program
{
    public static int Main(string[] args) => CommandLine.Run(args);
}
