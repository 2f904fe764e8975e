using Seamwright.Host.Commands;

namespace Seamwright.Host.Tests.Commands;

public class MakeDemoCommandTests
{
    [Theory]
    [InlineData("")]
    [InlineData("a b")]
    [InlineData("--help-me")]
    public void Run_WrongArguments_ReturnsBadArguments(string joined)
    {
        string[] args = joined.Split(' ', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal(ExitCodes.BadArguments, MakeDemoCommand.Run(args));
    }

    [Fact]
    public void CommandLine_MakeDemoWithoutFolder_IsDispatchedAndRejected()
    {
        // The message shows the command was dispatched (an unknown command says so instead).
        var saved = Console.Error;
        using var captured = new StringWriter();
        Console.SetError(captured);
        try
        {
            Assert.Equal(ExitCodes.BadArguments, CommandLine.Run(["make-demo"]));
        }
        finally
        {
            Console.SetError(saved);
        }
        Assert.Contains("make-demo: expected one argument", captured.ToString(), StringComparison.Ordinal);
    }
}
