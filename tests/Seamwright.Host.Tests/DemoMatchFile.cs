using System.Globalization;
using System.Text;
using Seamwright.Core.Geometry;
using Seamwright.Core.Synthetic;
using Seamwright.Tests.Shared;

namespace Seamwright.Host.Tests;

/// <summary>
/// The invented demo input of <c>seamwright estimate</c>: two overlapping photographs of one sheet
/// of a fictional hand-drawn estate map (3000 x 2000 px each), the second taken a little to the
/// right and tilted. Made by the project's own generator with a known transform, 0.8 px noise and
/// 40 % random matches.
/// Regenerate with: SEAMWRIGHT_WRITE_DEMO=1 dotnet test tests/Seamwright.Host.Tests --filter DemoMatchFileTests
/// </summary>
internal static class DemoMatchFile
{
    public static readonly Transform2D Truth = new(0.97, 0.035, -1250, -0.028, 0.985, 42, 1.2e-5, -6e-6, 1);

    public static readonly ImageSize Size = new(3000, 2000);

    public static string Path => System.IO.Path.Combine(RepoPaths.Root, "sample-folder", "estimate-demo", "map-sheet-matches.txt");

    public static string Generate()
    {
        var set = SyntheticMatches.Generate(Truth, Size, Size, 400, 0.4, 0.8, seed: 2026);
        var sb = new StringBuilder();
        sb.Append("x1,y1,x2,y2\n");
        foreach (var m in set.Matches)
        {
            sb.Append(string.Create(CultureInfo.InvariantCulture, $"{m.X1:0.000},{m.Y1:0.000},{m.X2:0.000},{m.Y2:0.000}\n"));
        }
        return sb.ToString();
    }
}
