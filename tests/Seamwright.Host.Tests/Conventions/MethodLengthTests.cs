using System.Text.RegularExpressions;
using Seamwright.Tests.Shared;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Conventions;

/// <summary>
/// House rule: no method in Seamwright.Pipeline or Seamwright.Host longer than 80 lines. A
/// Roslyn-free count that relies on the repository's formatting (Allman braces, 4-space indents,
/// enforced by the analyzers): a body is the lines between a member's opening brace and the
/// closing brace at the same indent; lambdas and local functions count towards the method that
/// holds them. Expression-bodied members are not counted.
/// </summary>
public sealed partial class MethodLengthTests(ITestOutputHelper output)
{
    private const int MaxLines = 80;

    [Fact]
    public void PipelineAndHost_EveryMethodBody_AtMost80Lines()
    {
        var bodies = new[] { "src/Seamwright.Pipeline", "src/Seamwright.Host" }
            .SelectMany(d => Directory.EnumerateFiles(Path.Combine(RepoPaths.Root, d), "*.cs", SearchOption.AllDirectories))
            .Where(f => !f.Contains("/obj/", StringComparison.Ordinal) && !f.Contains("/bin/", StringComparison.Ordinal))
            .SelectMany(f => MethodBodies(Path.GetRelativePath(RepoPaths.Root, f), File.ReadAllLines(f)))
            .OrderByDescending(b => b.Lines).ToList();

        Assert.True(bodies.Count > 300, $"only {bodies.Count} method bodies found: the scan is broken");
        foreach (var b in bodies.Take(5))
        {
            output.WriteLine($"{b.Lines,4}  {b.File} {b.Name}");
        }
        var tooLong = bodies.Where(b => b.Lines > MaxLines).Select(b => $"{b.File} {b.Name}: {b.Lines} lines").ToList();
        Assert.True(tooLong.Count == 0, "methods longer than 80 lines:" + Environment.NewLine + string.Join(Environment.NewLine, tooLong));
    }

    [Fact]
    public void MethodBodies_SmallSource_FindsMethodsSkipsTypesAndStatements()
    {
        string[] source =
        [
            "public sealed class Sample(int x)",
            "{",
            "    public int Long(int a,",
            "        int b)",
            "    {",
            "        if (a > b)",
            "        {",
            "            return a;",
            "        }",
            "        return b;",
            "    }",
            "",
            "    private static void Short() => Console.WriteLine();",
            "}",
        ];

        var bodies = MethodBodies("Sample.cs", source).ToList();

        var only = Assert.Single(bodies);
        Assert.Equal(("Long", 5), (only.Name, only.Lines));
    }

    internal static IEnumerable<(string File, string Name, int Lines)> MethodBodies(string file, string[] lines)
    {
        for (int i = 1; i < lines.Length; i++)
        {
            if (lines[i].Trim() != "{")
            {
                continue;
            }
            int indent = Indent(lines[i]);
            int decl = DeclarationStart(lines, i, indent);
            if (decl < 0 || NotAMethod().IsMatch(lines[decl]) || TypeKeyword().IsMatch(lines[decl]) || !lines[decl].Contains('(', StringComparison.Ordinal))
            {
                continue;
            }
            string head = lines[decl].Trim();
            if (head.StartsWith("new ", StringComparison.Ordinal) || head.StartsWith("return ", StringComparison.Ordinal)
                || head.StartsWith("var ", StringComparison.Ordinal) || head[..head.IndexOf('(', StringComparison.Ordinal)].Contains('=', StringComparison.Ordinal))
            {
                continue;
            }
            int end = i + 1;
            while (end < lines.Length && !(lines[end].Trim() == "}" && Indent(lines[end]) == indent))
            {
                end++;
            }
            var name = MemberName().Match(head);
            yield return (file, name.Success ? name.Groups[1].Value : head, end - i - 1);
        }
    }

    /// <summary>The first line of the declaration ending just above an opening brace, or -1 when it is not a member's.</summary>
    private static int DeclarationStart(string[] lines, int brace, int indent)
    {
        for (int j = brace - 1; j >= 0; j--)
        {
            string t = lines[j].Trim();
            if (t.Length == 0 || t.StartsWith("//", StringComparison.Ordinal) || t.StartsWith('[') || t.StartsWith('#')
                || t.EndsWith(';') || t.EndsWith('{') || t.EndsWith('}') || t.Contains("=>", StringComparison.Ordinal))
            {
                return -1;
            }
            if (Indent(lines[j]) == indent)
            {
                return j;
            }
        }
        return -1;
    }

    private static int Indent(string line) => line.Length - line.TrimStart().Length;

    [GeneratedRegex(@"^\s*(if|else|for|foreach|while|switch|using|lock|catch|try|do|fixed|finally|checked|unchecked|unsafe)\b")]
    private static partial Regex NotAMethod();

    [GeneratedRegex(@"\b(class|record|struct|interface|namespace|enum)\b")]
    private static partial Regex TypeKeyword();

    [GeneratedRegex(@"(\w+)\s*(?:<[^>]*>)?\s*\(")]
    private static partial Regex MemberName();
}
