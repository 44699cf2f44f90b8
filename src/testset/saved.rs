//! The payload of a checkpoint file (`<digest>.kckpt`, whose container the `cache` crate
//! writes): the state of an interrupted project-and-lift build together with the request it
//! was made for.
//!
//! The file is named by the entry key's digest, but one key can be built in more than one
//! way: the norm limit handed to the completion (`auto`, `none`, or a number at least the
//! proven bound) is not part of the key, since it does not change the finished set, yet it
//! changes the working sets between stages. A build therefore resumes only from a state saved
//! for exactly its own request.
//!
//! Layout (bincode, standard configuration): the string [`LAYOUT`], then the
//! [`RequestRecord`], the [`Checkpoint`] and the build work done up to it, in seconds over
//! every run of the build. A payload that does not start with that string (an older layout,
//! or damage the container's checksum missed) is not read: the build sets the file aside
//! and starts over.

use bincode::config;
use bincode::enc::write::Writer;
use cache::EntryKey;
use serde::{Deserialize, Serialize};

use super::spec::ResolvedSpec;
use crate::completion::{Checkpoint, Method, StateView};

/// The tag that opens every payload of this layout. Layout 1 (no tag, the bare state) did
/// not record the request; layout 2 held states between stages only and no work time;
/// layout 3 counted a level's pair tasks including those of groups beyond the norm limit
/// (a count of tasks done means other tasks now, so such a state is set aside).
const LAYOUT: &str = "kernstep.lift-checkpoint.4";

/// Everything that decides how a build runs: the entry key (row space, kind, signs and the
/// truncation that changes the set) and the truncation and method handed to the completion.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub(crate) struct RequestRecord {
    key: EntryKey,
    norm_limit: Option<u64>,
    bounds: Option<Vec<u64>>,
    method: Method,
}

impl RequestRecord {
    /// The request of a build of `spec`, whose entry key is `key`.
    pub(crate) fn of(key: &EntryKey, spec: &ResolvedSpec) -> Self {
        Self {
            key: key.clone(),
            norm_limit: spec.truncation.norm_limit,
            bounds: spec.truncation.bounds.clone(),
            method: spec.method,
        }
    }
}

/// The payload's fields after the tag, borrowed for writing (`S` encodes as a
/// [`Checkpoint`]).
#[derive(Serialize)]
struct Body<'a, S> {
    request: &'a RequestRecord,
    state: &'a S,
    work_seconds: f64,
}

/// The payload's fields after the tag, as read.
#[derive(Deserialize)]
struct ReadBody {
    request: RequestRecord,
    state: Checkpoint,
    work_seconds: f64,
}

/// A state read back, with the build work done up to it.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct Saved {
    /// The completion's state.
    pub state: Checkpoint,
    /// Seconds of build work, over every run, up to the state.
    pub work_seconds: f64,
}

/// The payload that saves `state` of a build of `request`, reached after `work_seconds` of
/// build work, appended to `out`. Written once, in place: no buffer of its own (a mid-stage
/// state of a large build is tens of megabytes).
pub(crate) fn append(
    request: &RequestRecord,
    state: &StateView<'_>,
    work_seconds: f64,
    out: &mut Vec<u8>,
) {
    append_state(request, state, work_seconds, out);
}

/// The length of the payload [`append`] writes.
pub(crate) fn payload_len(
    request: &RequestRecord,
    state: &StateView<'_>,
    work_seconds: f64,
) -> usize {
    let mut size = bincode::enc::write::SizeWriter::default();
    write_state(request, state, work_seconds, &mut size);
    size.bytes_written
}

/// [`append`] for any `state` that encodes as a [`Checkpoint`]; returns the payload's length.
fn append_state<S: Serialize>(
    request: &RequestRecord,
    state: &S,
    work_seconds: f64,
    out: &mut Vec<u8>,
) -> usize {
    let start = out.len();
    write_state(request, state, work_seconds, &mut VecWriter(out));
    out.len() - start
}

/// Writes the payload of `state` to `writer`.
fn write_state<S: Serialize>(
    request: &RequestRecord,
    state: &S,
    work_seconds: f64,
    writer: &mut impl Writer,
) {
    let body = Body {
        request,
        state,
        work_seconds,
    };
    // Encoding strings, integers and vectors into memory cannot fail.
    bincode::serde::encode_into_writer(LAYOUT, &mut *writer, config::standard())
        .expect("a string encodes");
    bincode::serde::encode_into_writer(body, writer, config::standard())
        .expect("a checkpoint of integers and vectors encodes");
}

/// A bincode writer appending to a vector.
struct VecWriter<'a>(&'a mut Vec<u8>);

impl Writer for VecWriter<'_> {
    fn write(&mut self, bytes: &[u8]) -> std::result::Result<(), bincode::error::EncodeError> {
        self.0.extend_from_slice(bytes);
        Ok(())
    }
}

/// The saved state, if `bytes` is a payload of this layout saved for exactly `request`:
/// `Ok(None)` for a valid payload of another request (of the same key), `Err` with the
/// problem for anything unusable (an older layout, unreadable bytes).
pub(crate) fn decode(
    bytes: &[u8],
    request: &RequestRecord,
) -> std::result::Result<Option<Saved>, String> {
    let Some(body) = read(bytes) else {
        return Err(format!("not a checkpoint payload of layout {LAYOUT:?}"));
    };
    if !(body.work_seconds.is_finite() && body.work_seconds >= 0.0) {
        return Err(format!("work time {} is not a duration", body.work_seconds));
    }
    Ok((body.request == *request).then_some(Saved {
        state: body.state,
        work_seconds: body.work_seconds,
    }))
}

/// What a checkpoint payload holds, whatever request it was saved for (for listings): the
/// key's width, the state and the work time; `None` if unusable.
pub(crate) fn peek(bytes: &[u8]) -> Option<(usize, Saved)> {
    let body = read(bytes)?;
    Some((
        body.request.key.width(),
        Saved {
            state: body.state,
            work_seconds: body.work_seconds,
        },
    ))
}

fn read(bytes: &[u8]) -> Option<ReadBody> {
    let (layout, used) =
        bincode::serde::decode_from_slice::<String, _>(bytes, config::standard()).ok()?;
    if layout != LAYOUT {
        return None;
    }
    let rest = bytes.get(used..)?;
    let (body, read) =
        bincode::serde::decode_from_slice::<ReadBody, _>(rest, config::standard()).ok()?;
    (read == rest.len()).then_some(body)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::completion::PackedRows;
    use cache::{SetKind, Sign, Truncation};

    fn request(norm_limit: Option<u64>) -> RequestRecord {
        RequestRecord {
            key: EntryKey {
                row_space: "1 1 0".into(),
                kind: SetKind::Graver,
                signs: vec![Sign::Free; 3],
                truncation: Truncation::default(),
            },
            norm_limit,
            bounds: None,
            method: Method::ProjectAndLift,
        }
    }

    fn state() -> Checkpoint {
        Checkpoint {
            lifted: vec![0, 2],
            elements: PackedRows::from_rows(&[vec![1, -1, 0], vec![0, 1, -1]]).unwrap(),
            symmetric: vec![true, false],
            within: None,
            exact: false,
        }
    }

    fn encoded(request: &RequestRecord, state: &Checkpoint, work_seconds: f64) -> Vec<u8> {
        let mut out = vec![7];
        let len = append_state(request, state, work_seconds, &mut out);
        assert_eq!((out.remove(0), out.len()), (7, len));
        out
    }

    fn saved() -> Option<Saved> {
        Some(Saved {
            state: state(),
            work_seconds: 2.5,
        })
    }

    #[test]
    fn a_state_reads_back_only_for_its_own_request() {
        let bytes = encoded(&request(Some(4)), &state(), 2.5);
        assert_eq!(decode(&bytes, &request(Some(4))), Ok(saved()));
        assert_eq!(decode(&bytes, &request(None)), Ok(None));
        assert_eq!(decode(&bytes, &request(Some(5))), Ok(None));
    }

    #[test]
    fn the_bare_state_of_layout_1_and_cut_payloads_are_not_read() {
        let bare = bincode::serde::encode_to_vec(state(), config::standard()).unwrap();
        assert!(decode(&bare, &request(Some(4))).is_err());
        let bytes = encoded(&request(Some(4)), &state(), 2.5);
        for cut in 0..bytes.len() {
            assert!(
                decode(&bytes[..cut], &request(Some(4))).is_err(),
                "cut at {cut}"
            );
        }
        let mut longer = bytes.clone();
        longer.push(0);
        assert!(decode(&longer, &request(Some(4))).is_err());
    }
}
