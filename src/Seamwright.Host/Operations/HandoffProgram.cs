namespace Seamwright.Host.Operations;

/// <summary>Finds the program of a downstream hand-off (<c>OnSetDone</c>) the way it will be started.</summary>
internal static class HandoffProgram
{
    /// <summary>
    /// The full path of <paramref name="program"/>: a path (absolute, or relative to the working
    /// directory) when it names a folder, else the first match on PATH (with PATHEXT on Windows).
    /// Null when there is no such file.
    /// </summary>
    public static string? Find(string program)
    {
        ArgumentNullException.ThrowIfNull(program);
        if (program.Length == 0 || program.Trim() != program)
        {
            return null;
        }
        if (program.IndexOfAny(['/', '\\']) >= 0)
        {
            string full = Path.GetFullPath(program);
            return File.Exists(full) ? full : null;
        }
        string[] suffixes = OperatingSystem.IsWindows()
            ? ["", .. (Environment.GetEnvironmentVariable("PATHEXT") ?? ".EXE;.CMD;.BAT").Split(';', StringSplitOptions.RemoveEmptyEntries)]
            : [""];
        foreach (var folder in (Environment.GetEnvironmentVariable("PATH") ?? "").Split(Path.PathSeparator, StringSplitOptions.RemoveEmptyEntries))
        {
            foreach (var suffix in suffixes)
            {
                string candidate = Path.Combine(folder, program + suffix);
                if (File.Exists(candidate))
                {
                    return Path.GetFullPath(candidate);
                }
            }
        }
        return null;
    }
}
