using Microsoft.Win32.SafeHandles;

namespace Seamwright.Pipeline.Loading;

/// <summary>
/// A read-only, seekable stream over an open file handle that does not own the handle, so the
/// header read and the decode see the very same file (no re-open race with a replaced file).
/// </summary>
internal sealed class HandleStream(SafeFileHandle handle, long length) : Stream
{
    private long _position;

    public override bool CanRead => true;

    public override bool CanSeek => true;

    public override bool CanWrite => false;

    public override long Length => length;

    public override long Position
    {
        get => _position;
        set => _position = value >= 0 ? value : throw new ArgumentOutOfRangeException(nameof(value));
    }

    public override int Read(byte[] buffer, int offset, int count) => Read(buffer.AsSpan(offset, count));

    public override int Read(Span<byte> buffer)
    {
        if (_position >= length || buffer.IsEmpty)
        {
            return 0;
        }
        int n = RandomAccess.Read(handle, buffer[..(int)Math.Min(buffer.Length, length - _position)], _position);
        _position += n;
        return n;
    }

    public override long Seek(long offset, SeekOrigin origin)
    {
        Position = origin switch
        {
            SeekOrigin.Begin => offset,
            SeekOrigin.Current => _position + offset,
            _ => length + offset,
        };
        return _position;
    }

    public override void Flush()
    {
    }

    public override void SetLength(long value) => throw new NotSupportedException();

    public override void Write(byte[] buffer, int offset, int count) => throw new NotSupportedException();
}
