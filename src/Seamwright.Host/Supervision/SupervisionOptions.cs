namespace Seamwright.Host.Supervision;

/// <summary>
/// Settings of supervised decoding (section "Supervision" of appsettings.json). Defaults are
/// common practice for 100 MP scans on a 2-core, 8 GB machine, not measured optima.
/// </summary>
internal sealed record SupervisionOptions
{
    /// <summary>Decode in worker processes (true) or in the service process (false). Default true.</summary>
    public bool Enabled { get; init; } = true;

    /// <summary>Worker processes kept running (1..32). Default 2.</summary>
    public int Workers { get; init; } = 2;

    /// <summary>Wall-clock limit per job, seconds (1..3600). Default 120.</summary>
    public double JobTimeoutSeconds { get; init; } = 120;

    /// <summary>Memory cap per worker, MiB (64..65536): GC hard limit, allocator limit, address space budget, kill threshold. Default 2048.</summary>
    public int MemoryCapMegabytes { get; init; } = 2048;

    /// <summary>Largest input file accepted, MiB. Default 1024.</summary>
    public long MaxFileMegabytes { get; init; } = 1024;

    /// <summary>Largest image accepted, megapixels (width x height). Default 250.</summary>
    public double MaxMegapixels { get; init; } = 250;

    /// <summary>Crashes, time-outs or memory kills on the same unchanged file before it is quarantined (1..10). Default 3.</summary>
    public int StrikesBeforeQuarantine { get; init; } = 3;

    /// <summary>How often the supervisor samples a busy worker's working set, milliseconds (10..5000). Default 100.</summary>
    public int MemoryPollMilliseconds { get; init; } = 100;

    public TimeSpan JobTimeout => TimeSpan.FromSeconds(JobTimeoutSeconds);

    public long MemoryCapBytes => (long)MemoryCapMegabytes << 20;

    /// <summary>Problems with these settings, each naming the setting and its allowed range; empty when valid.</summary>
    public IReadOnlyList<string> Validate()
    {
        var problems = new List<string>();
        Check(Workers is >= 1 and <= 32, "Supervision:Workers must be 1..32");
        Check(JobTimeoutSeconds is >= 1 and <= 3600, "Supervision:JobTimeoutSeconds must be 1..3600");
        Check(MemoryCapMegabytes is >= 64 and <= 65536, "Supervision:MemoryCapMegabytes must be 64..65536");
        Check(MaxFileMegabytes is >= 1 and <= 1 << 20, "Supervision:MaxFileMegabytes must be 1..1048576");
        Check(MaxMegapixels is > 0 and <= 10000, "Supervision:MaxMegapixels must be above 0 and at most 10000");
        Check(StrikesBeforeQuarantine is >= 1 and <= 10, "Supervision:StrikesBeforeQuarantine must be 1..10");
        Check(MemoryPollMilliseconds is >= 10 and <= 5000, "Supervision:MemoryPollMilliseconds must be 10..5000");
        return problems;

        void Check(bool ok, string message)
        {
            if (!ok)
            {
                problems.Add(message);
            }
        }
    }
}
