using System.Buffers.Binary;
using Seamwright.Host.Supervision;

namespace Seamwright.Host.Tests.Supervision;

public class WorkerProtocolTests
{
    [Fact]
    public async Task ReadAsync_AfterWrite_ReturnsSameMessages()
    {
        using var stream = new MemoryStream();
        var request = new WorkerRequest(7, "/in/a b.png", 1 << 20, 1_000_000);
        var reply = new WorkerReply(7, false, "corrupt", 0, 0, null, null, 123, true);
        await WorkerProtocol.WriteAsync(stream, request, CancellationToken.None);
        await WorkerProtocol.WriteAsync(stream, reply, CancellationToken.None);
        stream.Position = 0;
        Assert.Equal(request, await WorkerProtocol.ReadAsync<WorkerRequest>(stream, CancellationToken.None));
        Assert.Equal(reply, await WorkerProtocol.ReadAsync<WorkerReply>(stream, CancellationToken.None));
        Assert.Null(await WorkerProtocol.ReadAsync<WorkerReply>(stream, CancellationToken.None));
    }

    [Fact]
    public async Task ReadAsync_LengthOverLimit_ThrowsInvalidData()
    {
        var bytes = new byte[8];
        BinaryPrimitives.WriteInt32LittleEndian(bytes, WorkerProtocol.MaxFrameBytes + 1);
        using var stream = new MemoryStream(bytes);
        await Assert.ThrowsAsync<InvalidDataException>(() => WorkerProtocol.ReadAsync<WorkerReply>(stream, CancellationToken.None));
    }

    [Fact]
    public async Task ReadAsync_StreamEndsInsideFrame_ThrowsEndOfStream()
    {
        using var whole = new MemoryStream();
        await WorkerProtocol.WriteAsync(whole, new WorkerHello(1, 2, "x"), CancellationToken.None);
        using var cut = new MemoryStream(whole.ToArray()[..^3]);
        await Assert.ThrowsAsync<EndOfStreamException>(() => WorkerProtocol.ReadAsync<WorkerHello>(cut, CancellationToken.None));
    }
}
