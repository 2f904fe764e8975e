namespace Seamwright.Host;

/// <summary>Process exit codes; documented in README.md.</summary>
internal static class ExitCodes
{
    public const int Ok = 0;
    public const int Fatal = 1;
    public const int BadArguments = 2;
    public const int FinishedWithProblems = 3;
}
