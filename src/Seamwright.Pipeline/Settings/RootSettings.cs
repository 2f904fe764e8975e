namespace Seamwright.Pipeline.Settings;

/// <summary>Assigns a profile to the sets whose id matches a glob (<c>*</c> within one folder level, <c>**</c> across levels).</summary>
public sealed class ProfileRule
{
    public string Match { get; set; } = "";
    public string Profile { get; set; } = "";
}

/// <summary>A watched root: where images arrive, where outputs go, and how its sets are formed.</summary>
public sealed class RootSettings
{
    public string Path { get; set; } = "";
    /// <summary>Output root ("" = a sibling folder named after the root with "-seam" appended).</summary>
    public string Output { get; set; } = "";
    /// <summary>Profile for sets no rule matches.</summary>
    public string Profile { get; set; } = "default";
    /// <summary>
    /// "" = every folder holding images is a set. Otherwise a regular expression matched against the
    /// path relative to the root (with '/' separators); its named groups listed in <see cref="SetKeyGroups"/>
    /// form the set key, so files from several folders can form one set (the <c>frames</c> case).
    /// </summary>
    public string SetPattern { get; set; } = "";
    /// <summary>Named groups of <see cref="SetPattern"/> whose values form the set id.</summary>
    public List<string> SetKeyGroups { get; set; } = [];
    public List<ProfileRule> ProfileRules { get; set; } = [];
    /// <summary>
    /// Downstream hand-off: a program started after each set's manifest is written, with the manifest's
    /// full path as its last argument ("" = none). Never through a shell.
    /// </summary>
    public string OnSetDone { get; set; } = "";
    /// <summary>Arguments given to <see cref="OnSetDone"/> before the manifest path, each as one argument.</summary>
    public List<string> OnSetDoneArguments { get; set; } = [];
    /// <summary>Seconds <see cref="OnSetDone"/> may run before it is killed (with its child processes).</summary>
    public double OnSetDoneTimeoutSeconds { get; set; } = 60;

    /// <summary>The output root used when none is configured (documented in README).</summary>
    public static string DefaultOutputFor(string root)
    {
        string full = System.IO.Path.GetFullPath(root).TrimEnd(System.IO.Path.DirectorySeparatorChar, System.IO.Path.AltDirectorySeparatorChar);
        return full + "-seam";
    }

    public string EffectiveOutput => string.IsNullOrWhiteSpace(Output) ? DefaultOutputFor(Path) : System.IO.Path.GetFullPath(Output);
}

/// <summary>Service-wide settings (watching, scheduling, resources).</summary>
public sealed class ServiceSettings
{
    /// <summary>Seconds between full rescans of every root (events are only hints).</summary>
    public double RescanSeconds { get; set; } = 60;
    /// <summary>Milliseconds between looks at pending files and sets.</summary>
    public int PollMilliseconds { get; set; } = 500;
    /// <summary>Seconds a file's size and modification time must stay unchanged before it is decoded.</summary>
    public double StableSeconds { get; set; } = 2;
    /// <summary>Sets processed at the same time.</summary>
    public int MaxParallelSets { get; set; } = 1;
    /// <summary>Images decoded or pairs estimated at the same time within all sets.</summary>
    public int MaxParallelJobs { get; set; } = 2;
    /// <summary>Megabytes of decoded pixels allowed at once across all decodes.</summary>
    public int MemoryBudgetMegabytes { get; set; } = 1024;
    /// <summary>Megabytes of image features held in memory per set while its pairs are estimated (least recently used dropped; the rest is read from the feature cache).</summary>
    public int FeatureMemoryMegabytes { get; set; } = 256;
    /// <summary>Capacity of the bounded channels between the service loops.</summary>
    public int QueueCapacity { get; set; } = 4096;
    /// <summary>Seconds the host waits for work to stop at shutdown (keep below the service manager's limit).</summary>
    public double ShutdownSeconds { get; set; } = 30;
    /// <summary>This node's name in the ledger, manifests and confidence records ("" = the host name).</summary>
    public string NodeName { get; set; } = "";

    /// <summary>The configured node name, or the host name.</summary>
    public string EffectiveNodeName => string.IsNullOrWhiteSpace(NodeName) ? Environment.MachineName : NodeName.Trim();
}

/// <summary>Limits checked before any decode.</summary>
public sealed class LimitSettings
{
    public double MaxFileMegabytes { get; set; } = 1024;
    public double MaxMegapixels { get; set; } = 400;
}

/// <summary>The whole "Seamwright" configuration section.</summary>
public sealed class SeamwrightOptions
{
    public const string SectionName = "Seamwright";

    public List<RootSettings> Roots { get; set; } = [];
    /// <summary>Root settings used by <c>run</c> and <c>rerun</c> for a folder that no entry of <see cref="Roots"/> names.</summary>
    public RootSettings Run { get; set; } = new();
    public Dictionary<string, ProfileSettings> Profiles { get; set; } = new(StringComparer.Ordinal);
    public ServiceSettings Service { get; set; } = new();
    public LimitSettings Limits { get; set; } = new();
    /// <summary>The ledger's provider (SQLite per output root, or a shared PostgreSQL database).</summary>
    public StateSettings State { get; set; } = new();
    /// <summary>
    /// The pair engine: "features" (the real detector, matcher and estimator) or "checksum" (a fast
    /// engine for the service's own tests: it decodes every image but estimates nothing real).
    /// </summary>
    public string Engine { get; set; } = "features";

    public ProfileSettings Profile(string name) =>
        Profiles.TryGetValue(name, out var p) ? p : name == "default" ? new ProfileSettings() : throw new KeyNotFoundException("No profile named '" + name + "'.");

    /// <summary>The root settings for a folder: the configured root naming it, or <see cref="Run"/> applied to it.</summary>
    public RootSettings RootFor(string folder, string? output)
    {
        string full = System.IO.Path.GetFullPath(folder);
        var configured = Roots.FirstOrDefault(r => !string.IsNullOrWhiteSpace(r.Path) && PathsEqual(System.IO.Path.GetFullPath(r.Path), full));
        var basis = configured ?? Run;
        return new RootSettings
        {
            Path = full,
            Output = output ?? basis.Output,
            Profile = basis.Profile,
            SetPattern = basis.SetPattern,
            SetKeyGroups = basis.SetKeyGroups,
            ProfileRules = basis.ProfileRules,
            OnSetDone = basis.OnSetDone,
            OnSetDoneArguments = basis.OnSetDoneArguments,
            OnSetDoneTimeoutSeconds = basis.OnSetDoneTimeoutSeconds,
        };
    }

    private static bool PathsEqual(string a, string b) =>
        string.Equals(a.TrimEnd('/', '\\'), b.TrimEnd('/', '\\'), OperatingSystem.IsWindows() ? StringComparison.OrdinalIgnoreCase : StringComparison.Ordinal);
}
