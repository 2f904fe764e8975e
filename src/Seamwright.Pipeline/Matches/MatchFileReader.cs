using System.Globalization;
using Seamwright.Core.Geometry;

namespace Seamwright.Pipeline.Matches;

/// <summary>A match file's content.</summary>
/// <param name="Matches">Matches in file order (best first when the producer ranked them).</param>
/// <param name="BoundsA">Smallest image holding every first point (pixel centres at integers).</param>
/// <param name="BoundsB">Smallest image holding every second point.</param>
public sealed record MatchFile(Correspondence[] Matches, ImageSize BoundsA, ImageSize BoundsB);

/// <summary>Bad input in a match file, naming the file, the line (0 when none applies) and the reason.</summary>
public sealed class MatchFileException : Exception
{
    public MatchFileException(string file, int line, string reason)
        : base(line > 0 ? $"{file}:{line}: {reason}" : $"{file}: {reason}")
    {
        File = file;
        Line = line;
        Reason = reason;
    }

    public MatchFileException()
    {
        File = Reason = string.Empty;
    }

    public MatchFileException(string message) : base(message)
    {
        File = Reason = string.Empty;
    }

    public MatchFileException(string message, Exception innerException) : base(message, innerException)
    {
        File = Reason = string.Empty;
    }

    public string File { get; }

    public int Line { get; }

    public string Reason { get; }
}

/// <summary>
/// Reads tentative matches: one per line, <c>x1,y1,x2,y2</c> in pixels, separated by commas
/// and/or whitespace. The first non-blank line may be a header (any line whose first field is not
/// a number); blank lines and lines starting with '#' are skipped. Every value must be a finite
/// number (invariant culture). Nothing else is accepted, so a typo never turns into a match.
/// </summary>
public static class MatchFileReader
{
    private static readonly char[] Separators = [',', ' ', '\t', ';'];

    public static MatchFile Read(string path)
    {
        ArgumentNullException.ThrowIfNull(path);
        string name = path;
        try
        {
            using var reader = new StreamReader(path);
            return Parse(reader, name);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException or NotSupportedException or ArgumentException)
        {
            throw new MatchFileException(name, 0, "cannot read the file: " + ex.Message);
        }
    }

    public static MatchFile Parse(TextReader reader, string name)
    {
        ArgumentNullException.ThrowIfNull(reader);
        var matches = new List<Correspondence>();
        double maxX1 = 0, maxY1 = 0, maxX2 = 0, maxY2 = 0;
        bool seenContent = false;
        int lineNo = 0;
        Span<double> v = stackalloc double[4];
        for (string? line = reader.ReadLine(); line is not null; line = reader.ReadLine())
        {
            lineNo++;
            string trimmed = line.Trim();
            if (trimmed.Length == 0 || trimmed.StartsWith('#'))
            {
                continue;
            }
            var fields = trimmed.Split(Separators, StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
            bool firstIsNumber = fields.Length > 0 && double.TryParse(fields[0], NumberStyles.Float, CultureInfo.InvariantCulture, out _);
            if (!seenContent && !firstIsNumber)
            {
                seenContent = true; // a header line
                continue;
            }
            seenContent = true;
            if (fields.Length != 4)
            {
                throw new MatchFileException(name, lineNo, $"expected 4 values x1,y1,x2,y2 but found {fields.Length}");
            }
            for (int i = 0; i < 4; i++)
            {
                if (!double.TryParse(fields[i], NumberStyles.Float, CultureInfo.InvariantCulture, out v[i]))
                {
                    throw new MatchFileException(name, lineNo, $"value {i + 1} '{fields[i]}' is not a number");
                }
                if (!double.IsFinite(v[i]))
                {
                    throw new MatchFileException(name, lineNo, $"value {i + 1} '{fields[i]}' is not finite");
                }
            }
            matches.Add(new Correspondence(v[0], v[1], v[2], v[3]));
            maxX1 = Math.Max(maxX1, v[0]); maxY1 = Math.Max(maxY1, v[1]);
            maxX2 = Math.Max(maxX2, v[2]); maxY2 = Math.Max(maxY2, v[3]);
        }
        return new MatchFile([.. matches], Bounds(maxX1, maxY1), Bounds(maxX2, maxY2));
    }

    /// <summary>An image of W x H pixels spans [-0.5, W - 0.5] x [-0.5, H - 0.5] (pixel centres at integers).</summary>
    private static ImageSize Bounds(double maxX, double maxY) =>
        new((int)Math.Min(int.MaxValue, Math.Max(1, Math.Ceiling(maxX + 0.5))), (int)Math.Min(int.MaxValue, Math.Max(1, Math.Ceiling(maxY + 0.5))));
}
