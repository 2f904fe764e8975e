using System.Text.RegularExpressions;
using Seamwright.Core.Estimation;
using Seamwright.Tests.Shared;
using Xunit.Abstractions;

namespace Seamwright.Host.Tests.Conventions;

/// <summary>
/// House rule: what a motion model is lives in its family (<c>src/Seamwright.Core/Estimation/MotionFamily.cs</c>
/// and one class per model), so at most two files in <c>src/</c> name a member of the
/// <see cref="MotionModel"/> enum in code (a switch, a comparison or a constant of it): today only
/// the family registry. Every other file asks the family. Comment lines are not counted; the
/// members are read from the enum, so a new model is covered without editing this test.
/// </summary>
public sealed class MotionModelBranchTests(ITestOutputHelper output)
{
    private const int MaxFiles = 2;

    [Fact]
    public void Src_FilesNamingMotionModelMembers_AtMostTwo()
    {
        var files = Directory.EnumerateFiles(Path.Combine(RepoPaths.Root, "src"), "*.cs", SearchOption.AllDirectories)
            .Where(f => !f.Contains("/obj/", StringComparison.Ordinal) && !f.Contains("/bin/", StringComparison.Ordinal))
            .ToList();
        Assert.True(files.Count > 100, $"only {files.Count} source files found: the scan is broken");

        var branching = files.Where(f => NamesAMember(File.ReadAllLines(f)))
            .Select(f => Path.GetRelativePath(RepoPaths.Root, f)).Order(StringComparer.Ordinal).ToList();
        foreach (var f in branching)
        {
            output.WriteLine(f);
        }
        Assert.True(branching.Count <= MaxFiles,
            $"{branching.Count} files in src/ name MotionModel members (at most {MaxFiles}; ask MotionFamily instead):" + Environment.NewLine + string.Join(Environment.NewLine, branching));
    }

    [Fact]
    public void NamesAMember_SwitchOrComparison_FoundCommentAndParameterNot()
    {
        Assert.True(NamesAMember(["        MotionModel.Affine => 6,"]));
        Assert.True(NamesAMember(["        if (model == MotionModel.Homography)"]));
        Assert.True(NamesAMember(["            case MotionModel.Translation:"]));
        Assert.False(NamesAMember(["    /// <see cref=\"MotionModel.Homography\"/> is the default", "    // MotionModel.Affine"]));
        Assert.False(NamesAMember(["    public int Count(MotionModel model) => MotionFamily.Of(model).ParameterCount;"]));
    }

    internal static bool NamesAMember(string[] lines)
    {
        var member = new Regex(@"\bMotionModel\.(" + string.Join('|', Enum.GetNames<MotionModel>()) + @")\b", RegexOptions.CultureInvariant);
        return lines.Any(l => !l.TrimStart().StartsWith("//", StringComparison.Ordinal) && member.IsMatch(l));
    }
}
