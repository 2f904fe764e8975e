using Seamwright.Tests.Shared;

namespace Seamwright.Core.Tests;

public class SharedDataTests
{
    [Fact]
    public void HomogrSet_WhenPresent_HasSixteenPairsWithEightValidationRowsEach()
    {
        var set = HomogrSet.TryLoad();
        if (set is null)
        {
            Assert.False(RepoPaths.IsCi, "homogr set missing at " + RepoPaths.HomogrFolder + " (required when CI=true)");
            return;
        }
        Assert.Equal(16, set.Count);
        Assert.All(set, p => Assert.Equal(8, p.Validation.Length));
        // The reference model maps B to A, so its inverse must carry A's validation points onto B's
        // (README of the set: "the label-1 pairs agree with it exactly").
        Assert.All(set, p => Assert.True(p.ValidationError(p.ModelBToA.Inverse()) < 0.5, p.Name));
    }
}
