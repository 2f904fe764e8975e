namespace Seamwright.Pipeline.Sets;

/// <summary>Orders names so that digit runs compare by value: "img2" before "img10". Ties fall back to ordinal order.</summary>
public sealed class NaturalComparer : IComparer<string>
{
    public static readonly NaturalComparer Instance = new();

    public int Compare(string? x, string? y)
    {
        if (ReferenceEquals(x, y))
        {
            return 0;
        }
        if (x is null)
        {
            return -1;
        }
        if (y is null)
        {
            return 1;
        }
        int i = 0, j = 0;
        while (i < x.Length && j < y.Length)
        {
            if (char.IsAsciiDigit(x[i]) && char.IsAsciiDigit(y[j]))
            {
                int si = i, sj = j;
                while (si < x.Length && x[si] == '0') { si++; }
                while (sj < y.Length && y[sj] == '0') { sj++; }
                int ei = si, ej = sj;
                while (ei < x.Length && char.IsAsciiDigit(x[ei])) { ei++; }
                while (ej < y.Length && char.IsAsciiDigit(y[ej])) { ej++; }
                int lenCmp = (ei - si).CompareTo(ej - sj);
                if (lenCmp != 0)
                {
                    return lenCmp;
                }
                int digits = string.CompareOrdinal(x, si, y, sj, ei - si);
                if (digits != 0)
                {
                    return digits;
                }
                i = ei;
                j = ej;
                continue;
            }
            int c = char.ToLowerInvariant(x[i]).CompareTo(char.ToLowerInvariant(y[j]));
            if (c != 0)
            {
                return c;
            }
            i++;
            j++;
        }
        int rest = (x.Length - i).CompareTo(y.Length - j);
        return rest != 0 ? rest : string.CompareOrdinal(x, y);
    }
}
