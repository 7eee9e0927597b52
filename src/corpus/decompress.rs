//! Undoing compression within a cap: the defence against decompression bombs, and errors that
//! name decompression trouble as such.

use crate::error::ReadError;
use std::io::Read;

/// Stops a decompressor after `cap` bytes: the defence against decompression bombs.
pub(super) struct Capped<R> {
    inner: R,
    left: u64,
    cap: u64,
}

#[derive(Debug)]
struct CapExceeded(u64);

impl std::fmt::Display for CapExceeded {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "decompresses to more than {} bytes (raise the cap with --max-decompressed)",
            self.0
        )
    }
}
impl std::error::Error for CapExceeded {}

impl<R: Read> Read for Capped<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        if self.left == 0 {
            // One byte past the cap tells "exactly at the cap" from "over it".
            let mut probe = [0u8; 1];
            return match self.inner.read(&mut probe)? {
                0 => Ok(0),
                _ => Err(std::io::Error::other(CapExceeded(self.cap))),
            };
        }
        let want = buf.len().min(self.left.min(usize::MAX as u64) as usize);
        let n = self.inner.read(&mut buf[..want])?;
        self.left -= n as u64;
        Ok(n)
    }
}

pub(super) fn capped<R: Read>(inner: R, cap: u64) -> Capped<R> {
    Capped {
        inner,
        left: cap,
        cap,
    }
}

/// An I/O error from reading, with decompression trouble named as such.
pub(super) fn read_error(e: std::io::Error, compressed: bool) -> ReadError {
    if let Some(c) = e.get_ref().and_then(|i| i.downcast_ref::<CapExceeded>()) {
        return ReadError::TooLarge(c.to_string());
    }
    if compressed && e.kind() != std::io::ErrorKind::PermissionDenied {
        return ReadError::Malformed(format!("corrupt or truncated compressed data: {e}"));
    }
    ReadError::Io(e)
}
