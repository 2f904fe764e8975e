using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Sets;

/// <summary>What the completion policy says about a set now.</summary>
public enum CompletionDecision
{
    /// <summary>Not complete yet.</summary>
    Wait,
    /// <summary>Complete: process it.</summary>
    Complete,
    /// <summary>The maximum wait has passed without completion: process what is stable and mark the set incomplete.</summary>
    Overdue,
}

/// <summary>The facts about a waiting set that completion depends on.</summary>
/// <param name="StableFiles">Files whose size and time stayed unchanged for the stability period.</param>
/// <param name="UnstableFiles">Files still changing (or seen too recently).</param>
/// <param name="FirstSeenUtc">When the first file of this round arrived.</param>
/// <param name="LastChangeUtc">When any file of the set last appeared, changed or vanished.</param>
/// <param name="HasReadyMarker">The ready-marker file is present.</param>
public sealed record SetSnapshot(int StableFiles, int UnstableFiles, DateTime FirstSeenUtc, DateTime LastChangeUtc, bool HasReadyMarker);

/// <summary>
/// When a set is complete: every file stable, and then the ready marker present or the expected
/// count reached (when either is configured; either one completes), otherwise a quiet period
/// without changes. After the maximum wait the stable files are processed anyway and the set is
/// marked incomplete; a file that settles later makes the set stale, so it is redone whole.
/// </summary>
public static class SetCompletionPolicy
{
    public static (CompletionDecision Decision, string Why) Decide(CompletionSettings s, SetSnapshot set, DateTime nowUtc)
    {
        ArgumentNullException.ThrowIfNull(s);
        ArgumentNullException.ThrowIfNull(set);
        int total = set.StableFiles + set.UnstableFiles;
        if (total == 0)
        {
            return (CompletionDecision.Wait, "no images");
        }
        bool overdue = (nowUtc - set.FirstSeenUtc).TotalSeconds >= s.MaxWaitSeconds;
        if (set.UnstableFiles > 0)
        {
            return overdue && set.StableFiles > 0
                ? (CompletionDecision.Overdue, $"maximum wait of {s.MaxWaitSeconds} s passed with {set.UnstableFiles} files still changing")
                : (CompletionDecision.Wait, $"{set.UnstableFiles} files still changing");
        }
        bool useMarker = s.ReadyMarker.Length > 0;
        bool useCount = s.ExpectedCount > 0;
        if (useMarker || useCount)
        {
            if (useMarker && set.HasReadyMarker)
            {
                return (CompletionDecision.Complete, "ready marker present");
            }
            if (useCount && total >= s.ExpectedCount)
            {
                return (CompletionDecision.Complete, $"expected count of {s.ExpectedCount} reached");
            }
            return overdue
                ? (CompletionDecision.Overdue, $"maximum wait of {s.MaxWaitSeconds} s passed without " + (useMarker ? "the ready marker" : $"{s.ExpectedCount} images ({total} arrived)"))
                : (CompletionDecision.Wait, useMarker ? "waiting for the ready marker" : $"{total} of {s.ExpectedCount} images");
        }
        if ((nowUtc - set.LastChangeUtc).TotalSeconds >= s.QuietSeconds)
        {
            return (CompletionDecision.Complete, $"quiet for {s.QuietSeconds} s");
        }
        return overdue
            ? (CompletionDecision.Overdue, $"maximum wait of {s.MaxWaitSeconds} s passed while files kept arriving")
            : (CompletionDecision.Wait, "within the quiet period");
    }
}
