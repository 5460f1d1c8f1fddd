//! SHA-256 of the files a run judged, so that a filed summary can prove what it judged
//! (FIPS 180-4, through the `sha2` crate). A measurement file is hashed as its bytes stream
//! past, never held whole.

use sha2::{Digest, Sha256};
use std::io::{self, BufRead, Read};
use std::path::{Path, PathBuf};

/// One input file of a run and the SHA-256 of its bytes.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FileDigest {
    /// What the file is: `measurements`, `curve` or `job`.
    pub role: &'static str,
    /// The path as given (`-` for standard input).
    pub path: PathBuf,
    /// Lower-case hexadecimal SHA-256.
    pub sha256: String,
}

/// The digest of a small file read whole (a curve or job file).
pub fn of_file(role: &'static str, path: &Path) -> std::io::Result<FileDigest> {
    Ok(FileDigest {
        role,
        path: path.to_path_buf(),
        sha256: sha256_hex(&std::fs::read(path)?),
    })
}

/// Lower-case hexadecimal SHA-256 of `bytes`.
pub fn sha256_hex(bytes: &[u8]) -> String {
    hex(&Sha256::digest(bytes))
}

pub(crate) fn hex(d: &[u8]) -> String {
    d.iter().map(|b| format!("{b:02x}")).collect()
}

/// A reader that hashes every byte read through it (by `read` or by `consume`).
pub struct HashingReader<R> {
    inner: R,
    hasher: Sha256,
}

impl<R> HashingReader<R> {
    /// Hash what is read from `inner`.
    pub fn new(inner: R) -> Self {
        HashingReader {
            inner,
            hasher: Sha256::new(),
        }
    }

    /// The SHA-256 of the bytes read so far, lower-case hexadecimal.
    pub fn hex(&self) -> String {
        hex(&self.hasher.clone().finalize())
    }
}

impl<R: Read> Read for HashingReader<R> {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        let n = self.inner.read(buf)?;
        self.hasher.update(&buf[..n]);
        Ok(n)
    }
}

impl<R: BufRead> BufRead for HashingReader<R> {
    fn fill_buf(&mut self) -> io::Result<&[u8]> {
        self.inner.fill_buf()
    }
    fn consume(&mut self, amt: usize) {
        // The bytes to consume are the front of the buffer just filled: no read happens here.
        if let Ok(buf) = self.inner.fill_buf() {
            self.hasher.update(&buf[..amt.min(buf.len())]);
        }
        self.inner.consume(amt);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // FIPS 180-4 / NIST example: SHA-256("abc").
    #[test]
    fn known_digest() {
        assert_eq!(
            sha256_hex(b"abc"),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
    }

    // Read through `read_line` (BufRead) then `read_to_end` (Read): every byte hashed once.
    #[test]
    fn mixed_reads_hash_every_byte_once() {
        let text = b"id,major,minor\nA,3.0,2.4\nB,3.1,2.5\n".repeat(500);
        let mut r = HashingReader::new(io::BufReader::with_capacity(7, &text[..]));
        let mut line = String::new();
        r.read_line(&mut line).unwrap();
        let mut rest = Vec::new();
        r.read_to_end(&mut rest).unwrap();
        assert_eq!(r.hex(), sha256_hex(&text));
    }
}
