//! The entry file format, version 3 (`<digest-hex>.kset`); version 2, whose metadata ends
//! before the model's name, is still read.
//!
//! All integers are little-endian. Offsets in bytes:
//!
//! ```text
//! offset  size  field
//!      0     8  magic: 0x89 'K' 'S' 'E' 'T' 0x0D 0x0A 0x1A
//!      8     2  format version (u16) = 3 (2 is read)
//!     10     1  element encoding tag (see `encoding`: 0 Trit, 1 i8, 2 i16, 3 i32, 4 i64)
//!     11     1  flags, must be 0
//!     12    16  key digest (XXH3-128 of the canonical key encoding, see `key`)
//!     28     8  family digest (XXH3-64 of row space, kind and signs)
//!     36     8  element count (u64)
//!     44     8  width n (u64), equal to the key's number of signs
//!     52     4  key section length K (u32)
//!     56     4  metadata section length M (u32)
//!     60     8  element payload length P (u64)
//!     68     K  key: `EntryKey`, bincode 2 standard configuration via serde
//!   68+K     M  metadata: `SetMetadata`, same configuration
//! 68+K+M     P  elements, flat row-major, in the tagged encoding
//!   end-40  32  keyed BLAKE3 of every preceding byte under the cache's secret (the seal)
//!    end-8   8  XXH3-64 of every preceding byte, the seal included (the checksum)
//! ```
//!
//! Version 1 had the checksum alone; its files are refused as of another version (and
//! rebuilt). A reader checks, in this order: that the path is a regular file, magic,
//! version, flags and tag, the total length (68 + K + M + P + 40, against the file's length
//! before anything more is read, which catches truncation), checksum, then the key digest
//! against the file name and against the stored key, then the sections, and finally the seal.
//! A bad checksum means damage; a good checksum with a seal that does not verify under this
//! cache's secret means a foreign entry ([`Provenance::Foreign`]), which the caller must check
//! in full before use. Any failure is a typed [`CacheError`] naming the
//! file, and the entry is not used. The magic's first byte is non-ASCII and its tail holds CR
//! LF and SUB, so text-mode transfers are detected.

use std::fs::File;
use std::io::Read;
use std::path::Path;

use serde::de::DeserializeOwned;
use serde::Serialize;
use xxhash_rust::xxh3::xxh3_64;

use crate::data::TestSetData;
use crate::digest::Digest;
use crate::encoding::{self, Decoded, ElementEncoding};
use crate::error::CacheError;
use crate::key::EntryKey;
use crate::metadata::SetMetadata;
use crate::safe_read::{open_regular, read_exactly, read_up_to};
use crate::seal::{Provenance, Secret, SEAL_LEN};

/// First eight bytes of every entry file.
pub const ENTRY_MAGIC: [u8; 8] = [0x89, b'K', b'S', b'E', b'T', 0x0D, 0x0A, 0x1A];
/// The entry format version this build writes. Version 3 added the model's name at the end
/// of the metadata ([`SetMetadata::model`]); version 2 entries are still read (without it).
pub const FORMAT_VERSION: u16 = 3;

/// The oldest entry format version this build reads.
const OLDEST_READ: u16 = 2;
/// Bytes before the key section.
pub const HEADER_LEN: usize = 68;
/// Bytes of the checksum.
const CHECKSUM_LEN: usize = 8;
/// Bytes of the trailer: seal, then checksum.
pub const TRAILER_LEN: usize = CHECKSUM_LEN + SEAL_LEN;
const WHAT: &str = "test-set";
/// Largest section bincode may decode (guards allocations in unchecksummed partial reads).
const SECTION_LIMIT: usize = 1 << 28;

/// The fixed-size header, parsed.
#[derive(Clone, Debug)]
pub(crate) struct Header {
    pub version: u16,
    pub encoding: ElementEncoding,
    pub digest: Digest,
    pub family: u64,
    pub count: u64,
    pub width: u64,
    pub key_len: usize,
    pub meta_len: usize,
    pub payload_len: u64,
}

/// A fully checked entry.
pub(crate) struct DecodedEntry {
    pub key: EntryKey,
    pub metadata: SetMetadata,
    pub data: TestSetData,
    pub encoding: ElementEncoding,
    pub provenance: Provenance,
}

/// The header, key and metadata of an entry, read without the elements and unchecksummed.
pub(crate) struct EntryHead {
    pub header: Header,
    pub key: EntryKey,
    pub metadata: SetMetadata,
    pub file_len: u64,
}

/// Serialises one entry to the bytes of its file, sealed with `secret`.
pub(crate) fn encode_entry(
    key: &EntryKey,
    data: &TestSetData,
    metadata: &SetMetadata,
    secret: &Secret,
) -> Result<Vec<u8>, CacheError> {
    let key_bytes = encode_section("key", key)?;
    let meta_bytes = encode_section("metadata", metadata)?;
    let encoding = ElementEncoding::narrowest_for(data.entries());
    let payload_len = encoding
        .payload_len(data.entries().len())
        .ok_or(CacheError::Overflow {
            what: "payload length",
        })?;
    let total = [key_bytes.len(), meta_bytes.len(), payload_len, TRAILER_LEN]
        .iter()
        .try_fold(HEADER_LEN, |acc, &n| acc.checked_add(n))
        .ok_or(CacheError::Overflow {
            what: "file length",
        })?;
    let mut out = Vec::with_capacity(total);
    out.extend_from_slice(&ENTRY_MAGIC);
    out.extend_from_slice(&FORMAT_VERSION.to_le_bytes());
    out.push(encoding.tag());
    out.push(0);
    out.extend_from_slice(&key.digest().0);
    out.extend_from_slice(&key.family().to_le_bytes());
    out.extend_from_slice(&to_u64(data.len(), "element count")?.to_le_bytes());
    out.extend_from_slice(&to_u64(data.width(), "width")?.to_le_bytes());
    out.extend_from_slice(&to_u32(key_bytes.len(), "key section length")?.to_le_bytes());
    out.extend_from_slice(&to_u32(meta_bytes.len(), "metadata section length")?.to_le_bytes());
    out.extend_from_slice(&to_u64(payload_len, "payload length")?.to_le_bytes());
    out.extend_from_slice(&key_bytes);
    out.extend_from_slice(&meta_bytes);
    encoding::encode(encoding, data.entries(), &mut out);
    let seal = secret.seal(&out);
    out.extend_from_slice(&seal);
    let checksum = xxh3_64(&out);
    out.extend_from_slice(&checksum.to_le_bytes());
    Ok(out)
}

/// Checks that `bytes` has the `expected` length (`None`: a length that overflowed) and that
/// its trailing XXH3-64 matches everything before it; returns that checked body. Shared by
/// entries (without their seal) and checkpoints.
pub(crate) fn checked_body<'a>(
    bytes: &'a [u8],
    path: &Path,
    expected: Option<u64>,
) -> Result<&'a [u8], CacheError> {
    if expected != Some(bytes.len() as u64) {
        return Err(CacheError::LengthMismatch {
            path: path.to_owned(),
            expected: expected.unwrap_or(u64::MAX),
            actual: bytes.len() as u64,
        });
    }
    let (body, trailer) = bytes.split_at(bytes.len() - CHECKSUM_LEN);
    let stored = u64::from_le_bytes(trailer.try_into().expect("trailer is 8 bytes"));
    let computed = xxh3_64(body);
    if stored != computed {
        return Err(CacheError::ChecksumMismatch {
            path: path.to_owned(),
            stored,
            computed,
        });
    }
    Ok(body)
}

/// Reads the whole entry file at `path` (`Ok(None)` if absent): a regular file whose header
/// is checked, and whose length is compared with the header's, before the rest is read.
pub(crate) fn read_entry_file(path: &Path) -> Result<Option<Vec<u8>>, CacheError> {
    let Some(mut opened) = open_entry(path)? else {
        return Ok(None);
    };
    let rest = opened.file_len - HEADER_LEN as u64;
    read_exactly(&mut opened.file, rest, path, &mut opened.header_bytes)?;
    Ok(Some(opened.header_bytes))
}

/// An entry file opened with its header read and checked against the file's length.
struct OpenedEntry {
    file: File,
    file_len: u64,
    header: Header,
    header_bytes: Vec<u8>,
}

/// Opens the regular file at `path` (`Ok(None)` if absent), reads and parses its header and
/// checks that the file is as long as the header says, before anything else is read.
fn open_entry(path: &Path) -> Result<Option<OpenedEntry>, CacheError> {
    let Some((mut file, file_len)) = open_regular(path, WHAT)? else {
        return Ok(None);
    };
    let mut header_bytes = vec![0u8; HEADER_LEN];
    let got = read_up_to(&mut file, &mut header_bytes, path)?;
    header_bytes.truncate(got);
    let header = parse_header(&header_bytes, path)?;
    let expected = total_len(&header, path)?;
    if expected != file_len {
        return Err(CacheError::LengthMismatch {
            path: path.to_owned(),
            expected,
            actual: file_len,
        });
    }
    Ok(Some(OpenedEntry {
        file,
        file_len,
        header,
        header_bytes,
    }))
}

/// Checks and decodes a whole entry file whose name says it holds `named`, and tells whether
/// `secret` sealed it.
pub(crate) fn decode_entry(
    bytes: &[u8],
    path: &Path,
    named: Digest,
    secret: &Secret,
) -> Result<DecodedEntry, CacheError> {
    let header = parse_header(bytes, path)?;
    let total = total_len(&header, path)?;
    if total != bytes.len() as u64 {
        return Err(CacheError::LengthMismatch {
            path: path.to_owned(),
            expected: total,
            actual: bytes.len() as u64,
        });
    }
    let checked = checked_body(bytes, path, Some(total))?;
    let (body, seal) = checked.split_at(checked.len() - SEAL_LEN);
    let key_end = HEADER_LEN + header.key_len;
    let meta_end = key_end + header.meta_len;
    let key = decode_key(&bytes[HEADER_LEN..key_end], &header, path, named)?;
    let metadata = decode_metadata(&bytes[key_end..meta_end], &header, path)?;
    let data = decode_payload(&bytes[meta_end..body.len()], &header, &key, path)?;
    let seal: &[u8; SEAL_LEN] = seal.try_into().expect("the seal's length");
    Ok(DecodedEntry {
        key,
        metadata,
        data,
        encoding: header.encoding,
        provenance: secret.verifies(body, seal),
    })
}

/// Reads header, key and metadata of the file at `path` (no checksum: for listings and
/// for choosing candidates, which are fully checked before use).
pub(crate) fn read_head(path: &Path, named: Digest) -> Result<EntryHead, CacheError> {
    let OpenedEntry {
        mut file,
        file_len,
        header,
        ..
    } = open_entry(path)?.ok_or_else(|| {
        CacheError::io(
            "open",
            path,
            std::io::Error::from(std::io::ErrorKind::NotFound),
        )
    })?;
    let mut sections = vec![0u8; header.key_len + header.meta_len];
    file.read_exact(&mut sections)
        .map_err(|e| CacheError::io("read", path, e))?;
    let (key_bytes, meta_bytes) = sections.split_at(header.key_len);
    let key = decode_key(key_bytes, &header, path, named)?;
    let metadata = decode_metadata(meta_bytes, &header, path)?;
    Ok(EntryHead {
        header,
        key,
        metadata,
        file_len,
    })
}

/// Checks magic, version, flags and encoding tag, then parses the fixed header.
pub(crate) fn parse_header(bytes: &[u8], path: &Path) -> Result<Header, CacheError> {
    let version = check_magic_version(
        bytes,
        path,
        &ENTRY_MAGIC,
        WHAT,
        OLDEST_READ..=FORMAT_VERSION,
    )?;
    if bytes.len() < HEADER_LEN {
        return Err(too_short(path, HEADER_LEN, bytes.len()));
    }
    let u64_at = |at: usize| u64::from_le_bytes(bytes[at..at + 8].try_into().expect("8 bytes"));
    let u32_at = |at: usize| u32::from_le_bytes(bytes[at..at + 4].try_into().expect("4 bytes"));
    let malformed = |problem| CacheError::Malformed {
        path: path.to_owned(),
        section: "header",
        problem,
    };
    let encoding = ElementEncoding::from_tag(bytes[10])
        .ok_or_else(|| malformed("unknown element encoding tag"))?;
    if bytes[11] != 0 {
        return Err(malformed("unknown flags are set"));
    }
    Ok(Header {
        version,
        encoding,
        digest: Digest(bytes[12..28].try_into().expect("16 bytes")),
        family: u64_at(28),
        count: u64_at(36),
        width: u64_at(44),
        key_len: usize::try_from(u32_at(52)).map_err(|_| malformed("key length"))?,
        meta_len: usize::try_from(u32_at(56)).map_err(|_| malformed("metadata length"))?,
        payload_len: u64_at(60),
    })
}

/// Checks the magic bytes (as far as present) and the version field of any kernstep file.
pub(crate) fn check_magic_version(
    bytes: &[u8],
    path: &Path,
    magic: &[u8; 8],
    what: &'static str,
    supported: std::ops::RangeInclusive<u16>,
) -> Result<u16, CacheError> {
    let present = bytes.len().min(magic.len());
    if bytes[..present] != magic[..present] {
        return Err(CacheError::BadMagic {
            path: path.to_owned(),
            what,
        });
    }
    if bytes.len() < 10 {
        return Err(too_short(path, 10, bytes.len()));
    }
    let found = u16::from_le_bytes([bytes[8], bytes[9]]);
    if !supported.contains(&found) {
        return Err(CacheError::UnsupportedVersion {
            path: path.to_owned(),
            found,
            supported: *supported.end(),
        });
    }
    Ok(found)
}

/// The error for a file that ends before `needed` bytes.
pub(crate) fn too_short(path: &Path, needed: usize, actual: usize) -> CacheError {
    CacheError::LengthMismatch {
        path: path.to_owned(),
        expected: needed as u64,
        actual: actual as u64,
    }
}

fn total_len(header: &Header, path: &Path) -> Result<u64, CacheError> {
    [
        header.key_len as u64,
        header.meta_len as u64,
        header.payload_len,
        TRAILER_LEN as u64,
    ]
    .iter()
    .try_fold(HEADER_LEN as u64, |acc, &n| acc.checked_add(n))
    .ok_or_else(|| CacheError::Malformed {
        path: path.to_owned(),
        section: "header",
        problem: "section lengths overflow",
    })
}

fn decode_key(
    bytes: &[u8],
    header: &Header,
    path: &Path,
    named: Digest,
) -> Result<EntryKey, CacheError> {
    if header.digest != named {
        return Err(key_mismatch(path, header.digest, named, "its file name"));
    }
    let key: EntryKey = decode_section(bytes, path, "key")?;
    let actual = key.digest();
    if actual != header.digest || key.family() != header.family {
        return Err(key_mismatch(path, header.digest, actual, "its stored key"));
    }
    Ok(key)
}

/// The error for a digest `found` in a file where `expected` (from `from`) was due.
pub(crate) fn key_mismatch(
    path: &Path,
    found: Digest,
    expected: Digest,
    from: &'static str,
) -> CacheError {
    CacheError::KeyMismatch {
        path: path.to_owned(),
        found: found.to_hex(),
        expected: expected.to_hex(),
        expected_from: from,
    }
}

fn decode_payload(
    bytes: &[u8],
    header: &Header,
    key: &EntryKey,
    path: &Path,
) -> Result<TestSetData, CacheError> {
    let malformed = |problem| CacheError::Malformed {
        path: path.to_owned(),
        section: "elements",
        problem,
    };
    let width = usize::try_from(header.width).map_err(|_| malformed("width too large"))?;
    if width != key.width() {
        return Err(malformed(
            "width differs from the key's number of variables",
        ));
    }
    let entries = usize::try_from(header.count)
        .ok()
        .and_then(|c| c.checked_mul(width))
        .ok_or_else(|| malformed("element count too large"))?;
    if header.encoding.payload_len(entries) != Some(bytes.len()) {
        return Err(malformed("payload length does not match count x width"));
    }
    match encoding::decode(header.encoding, bytes, entries).map_err(malformed)? {
        Decoded::Small(flat) => TestSetData::from_small(width, flat),
        Decoded::Full(flat) => TestSetData::new(width, flat),
    }
    .map_err(|_| malformed("zero width"))
}

fn config() -> impl bincode::config::Config {
    bincode::config::standard().with_limit::<SECTION_LIMIT>()
}

fn encode_section<T: Serialize>(section: &'static str, value: &T) -> Result<Vec<u8>, CacheError> {
    bincode::serde::encode_to_vec(value, config())
        .map_err(|source| CacheError::Encode { section, source })
}

fn decode_section<T: DeserializeOwned>(
    bytes: &[u8],
    path: &Path,
    section: &'static str,
) -> Result<T, CacheError> {
    let (value, used) = bincode::serde::decode_from_slice(bytes, config()).map_err(|source| {
        CacheError::Decode {
            path: path.to_owned(),
            section,
            source,
        }
    })?;
    if used != bytes.len() {
        return Err(CacheError::Malformed {
            path: path.to_owned(),
            section,
            problem: "bytes left over after the section",
        });
    }
    Ok(value)
}

/// The metadata section of an entry of `header`'s version. Version 2 ended before the
/// model's name; its section reads as one whose name is absent (bincode writes `None` as one
/// zero byte), so the one layout serves both.
fn decode_metadata(bytes: &[u8], header: &Header, path: &Path) -> Result<SetMetadata, CacheError> {
    if header.version >= 3 {
        return decode_section(bytes, path, "metadata");
    }
    let mut extended = Vec::with_capacity(bytes.len() + 1);
    extended.extend_from_slice(bytes);
    extended.push(0);
    decode_section(&extended, path, "metadata")
}

fn to_u64(n: usize, what: &'static str) -> Result<u64, CacheError> {
    u64::try_from(n).map_err(|_| CacheError::Overflow { what })
}

fn to_u32(n: usize, what: &'static str) -> Result<u32, CacheError> {
    u32::try_from(n).map_err(|_| CacheError::Overflow { what })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::{Completeness, ElementEncoding, SetKind, Sign, Truncation};

    /// The stored bytes of the enumerations do not depend on how JSON spells them: bincode
    /// writes a variant as its index (a one-byte varint below 251; bincode 2 specification,
    /// "Enums"), so the lower snake case names of the JSON contract leave every entry file
    /// as it was.
    #[test]
    fn enumerations_are_stored_by_index_whatever_json_calls_them() {
        let bytes = |v: &dyn erased::Encode| v.bytes();
        assert_eq!(bytes(&SetKind::Graver), [0]);
        assert_eq!(bytes(&SetKind::Cycles), [2]);
        assert_eq!(bytes(&Sign::NonPositive), [2]);
        assert_eq!(bytes(&ElementEncoding::I16), [2]);
        assert_eq!(bytes(&Completeness::NormTruncated { limit: 7 }), [2, 7]);
        let path = Path::new("k.kset");
        let read: Completeness = decode_section(&[2, 7], path, "metadata").unwrap();
        assert_eq!(read, Completeness::NormTruncated { limit: 7 });
    }

    /// An entry written by format version 2, whose metadata ended before the model's name,
    /// reads as the same entry with no name (and sealed: the seal covers its own bytes); a
    /// version 3 entry keeps the name it was given.
    #[test]
    fn a_version_2_entry_reads_with_no_model_name() {
        let key = EntryKey {
            row_space: "cols=2;1,1".into(),
            kind: SetKind::Graver,
            signs: vec![Sign::Free; 2],
            truncation: Truncation::default(),
        };
        let metadata = SetMetadata {
            matrix: vec![vec![1, 1]],
            rank: 1,
            delta: "1".into(),
            delta_exact: true,
            column_number: 1,
            norm_bound: Some(2),
            method: "project-and-lift".into(),
            completeness: Completeness::Complete,
            build_seconds: 0.5,
            kernstep_version: "0.1.0".into(),
            created_unix: 1_700_000_000,
            model: None,
        };
        let data = TestSetData::new(2, vec![1, -1]).unwrap();
        let secret = Secret::fixed();
        let path = Path::new("k.kset");
        let v3 = encode_entry(&key, &data, &metadata, &secret).unwrap();
        let length = |at: usize| u32::from_le_bytes(v3[at..at + 4].try_into().unwrap()) as usize;
        let (key_len, meta_len) = (length(52), length(56));
        let meta_end = HEADER_LEN + key_len + meta_len;
        assert_eq!(v3[meta_end - 1], 0, "an absent name is one zero byte");
        // The same entry as version 2 wrote it: no name byte, its own lengths, seal and
        // checksum.
        let mut v2 = v3[..v3.len() - TRAILER_LEN].to_vec();
        v2.remove(meta_end - 1);
        v2[8..10].copy_from_slice(&2u16.to_le_bytes());
        v2[56..60].copy_from_slice(&(meta_len as u32 - 1).to_le_bytes());
        let seal = secret.seal(&v2);
        v2.extend_from_slice(&seal);
        let checksum = xxh3_64(&v2);
        v2.extend_from_slice(&checksum.to_le_bytes());
        let read = decode_entry(&v2, path, key.digest(), &secret).unwrap();
        assert_eq!((&read.key, &read.metadata), (&key, &metadata));
        assert_eq!(read.provenance, Provenance::Sealed);
        let named = SetMetadata {
            model: Some("orchard_crates.json".into()),
            ..metadata
        };
        let v3 = encode_entry(&key, &data, &named, &secret).unwrap();
        let read = decode_entry(&v3, path, key.digest(), &secret).unwrap();
        assert_eq!(read.metadata, named);
        let mut v4 = v3.clone();
        v4[8..10].copy_from_slice(&4u16.to_le_bytes());
        assert!(matches!(
            decode_entry(&v4, path, key.digest(), &secret),
            Err(CacheError::UnsupportedVersion {
                found: 4,
                supported: 3,
                ..
            })
        ));
    }

    /// A value encoded as a section, behind one object type for the test's table.
    mod erased {
        pub trait Encode {
            fn bytes(&self) -> Vec<u8>;
        }

        impl<T: serde::Serialize> Encode for T {
            fn bytes(&self) -> Vec<u8> {
                super::encode_section("test", self).unwrap()
            }
        }
    }
}
