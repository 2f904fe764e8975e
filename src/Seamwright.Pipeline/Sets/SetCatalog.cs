using System.Text.RegularExpressions;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Sets;

/// <summary>
/// Groups the images under a watched root into sets: by folder, or by a file-name pattern whose
/// named groups form the set key across folders. Skips hidden files and folders (names starting
/// with '.', which covers our temporary files and the state folder) and the output root when it
/// lies inside the watched root, so outputs are never ingested.
/// </summary>
public sealed class SetCatalog
{
    private readonly RootSettings _root;
    private readonly SeamwrightOptions _options;
    private readonly string _rootPath;
    private readonly string _outputPath;
    private readonly Regex? _pattern;
    private readonly List<(Regex Glob, string Profile)> _rules;

    public SetCatalog(RootSettings root, SeamwrightOptions options)
    {
        ArgumentNullException.ThrowIfNull(root);
        _root = root;
        _options = options;
        _rootPath = Path.GetFullPath(root.Path).TrimEnd('/', '\\');
        _outputPath = root.EffectiveOutput.TrimEnd('/', '\\');
        _pattern = string.IsNullOrEmpty(root.SetPattern) ? null : new Regex(root.SetPattern, RegexOptions.CultureInvariant, TimeSpan.FromSeconds(1));
        _rules = root.ProfileRules.Select(r => (GlobToRegex(r.Match), r.Profile)).ToList();
    }

    public string RootPath => _rootPath;

    public string OutputPath => _outputPath;

    public bool IsPatternMode => _pattern is not null;

    /// <summary>The profile that applies to a set id.</summary>
    public string ProfileFor(string setId)
    {
        foreach (var (glob, profile) in _rules)
        {
            if (glob.IsMatch(setId))
            {
                return profile;
            }
        }
        return _root.Profile;
    }

    /// <summary>True when a path must never be treated as an input (outputs, state, hidden files).</summary>
    public bool IsExcluded(string fullPath)
    {
        string p = Path.GetFullPath(fullPath);
        if (IsUnder(p, _outputPath))
        {
            return true;
        }
        string rel = Path.GetRelativePath(_rootPath, p);
        return rel.StartsWith("..", StringComparison.Ordinal) || rel.Split('/', '\\').Any(s => s.StartsWith('.') && s != ".");
    }

    /// <summary>Root-relative path with '/' separators.</summary>
    public string RootRelative(string fullPath) => Path.GetRelativePath(_rootPath, fullPath).Replace('\\', '/');

    /// <summary>Where a file belongs: (set id, key in the set), or null when it is not an input image.</summary>
    public (string SetId, string Key)? Classify(string fullPath)
    {
        if (IsExcluded(fullPath))
        {
            return null;
        }
        string rel = RootRelative(fullPath);
        if (_pattern is null)
        {
            string? dir = Path.GetDirectoryName(rel)?.Replace('\\', '/');
            string setId = string.IsNullOrEmpty(dir) ? "." : dir;
            return IsImage(fullPath, ProfileFor(setId)) ? (setId, Path.GetFileName(rel)) : null;
        }
        var m = _pattern.Match(rel);
        if (!m.Success)
        {
            return null;
        }
        var groups = _root.SetKeyGroups.Count > 0 ? _root.SetKeyGroups : _pattern.GetGroupNames().Where(g => !int.TryParse(g, out _)).ToList();
        string id = string.Join("_", groups.Select(g => g + "-" + m.Groups[g].Value));
        return IsImage(fullPath, ProfileFor(id)) ? (id, rel) : null;
    }

    /// <summary>The folder (under the watched root) holding a folder set's ready marker; null for pattern sets.</summary>
    public string? MarkerFolder(string setId) =>
        _pattern is not null ? null : setId == "." ? _rootPath : Path.Combine(_rootPath, setId.Replace('/', Path.DirectorySeparatorChar));

    private bool IsImage(string path, string profile)
    {
        string ext = Path.GetExtension(path);
        return _options.Profile(profile).EffectiveExtensions.Any(e => string.Equals(e, ext, StringComparison.OrdinalIgnoreCase));
    }

    /// <summary>Enumerates every set under the root as it is now.</summary>
    public IReadOnlyList<SetInputs> Discover()
    {
        var bySet = new Dictionary<string, List<InputFile>>(StringComparer.Ordinal);
        foreach (var path in EnumerateFiles(_rootPath))
        {
            var where = Classify(path);
            if (where is null)
            {
                continue;
            }
            var info = new FileInfo(path);
            if (!info.Exists)
            {
                continue;
            }
            if (!bySet.TryGetValue(where.Value.SetId, out var list))
            {
                bySet[where.Value.SetId] = list = [];
            }
            list.Add(new InputFile(info.FullName, RootRelative(info.FullName), where.Value.Key, info.Length, info.LastWriteTimeUtc.Ticks));
        }
        return bySet.OrderBy(kv => kv.Key, StringComparer.Ordinal).Select(kv => Build(kv.Key, kv.Value)).ToList();
    }

    /// <summary>Builds a set from its files, sorted naturally by key, with the marker looked up.</summary>
    public SetInputs Build(string setId, IEnumerable<InputFile> files)
    {
        string profile = ProfileFor(setId);
        string marker = _options.Profile(profile).Completion.ReadyMarker;
        string? markerFolder = MarkerFolder(setId);
        bool hasMarker = marker.Length > 0 && markerFolder is not null && File.Exists(Path.Combine(markerFolder, marker));
        return new SetInputs(setId, profile, files.OrderBy(f => f.Key, NaturalComparer.Instance).ToList(), hasMarker);
    }

    private IEnumerable<string> EnumerateFiles(string dir)
    {
        var stack = new Stack<string>();
        stack.Push(dir);
        while (stack.Count > 0)
        {
            string d = stack.Pop();
            if (IsUnder(Path.GetFullPath(d), _outputPath))
            {
                continue;
            }
            string[] files, subdirs;
            try
            {
                files = Directory.GetFiles(d);
                subdirs = Directory.GetDirectories(d);
            }
            catch (IOException)
            {
                continue; // vanished while listing; the next rescan sees the truth
            }
            catch (UnauthorizedAccessException)
            {
                continue;
            }
            foreach (var f in files)
            {
                if (!Path.GetFileName(f).StartsWith('.'))
                {
                    yield return f;
                }
            }
            foreach (var s in subdirs)
            {
                if (!Path.GetFileName(s).StartsWith('.'))
                {
                    stack.Push(s);
                }
            }
        }
    }

    private static bool IsUnder(string path, string folder) =>
        path == folder || path.StartsWith(folder + Path.DirectorySeparatorChar, StringComparison.Ordinal);

    /// <summary><c>**</c> matches across folder levels, <c>*</c> within one, <c>?</c> one character.</summary>
    public static Regex GlobToRegex(string glob)
    {
        var sb = new System.Text.StringBuilder("^");
        for (int i = 0; i < glob.Length; i++)
        {
            char c = glob[i];
            if (c == '*' && i + 1 < glob.Length && glob[i + 1] == '*')
            {
                sb.Append(".*");
                i++;
            }
            else if (c == '*')
            {
                sb.Append("[^/]*");
            }
            else if (c == '?')
            {
                sb.Append("[^/]");
            }
            else
            {
                sb.Append(Regex.Escape(c.ToString()));
            }
        }
        return new Regex(sb.Append('$').ToString(), RegexOptions.CultureInvariant, TimeSpan.FromSeconds(1));
    }
}
