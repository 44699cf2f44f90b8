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
//! [`RequestRecord`], then the [`Checkpoint`]. A payload that does not start with that string
//! (an older layout, or damage the container's checksum missed) is not read.

use bincode::config;
use cache::EntryKey;
use serde::{Deserialize, Serialize};

use super::spec::ResolvedSpec;
use crate::completion::{Checkpoint, Method};

/// The tag that opens every payload of this layout. Layout 1 (no tag, the bare state) did
/// not record the request.
const LAYOUT: &str = "kernstep.lift-checkpoint.2";

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

/// The payload's fields after the tag, borrowed for writing.
#[derive(Serialize)]
struct Body<'a> {
    request: &'a RequestRecord,
    state: &'a Checkpoint,
}

/// The payload's fields after the tag, as read.
#[derive(Deserialize)]
struct ReadBody {
    request: RequestRecord,
    state: Checkpoint,
}

/// The payload that saves `state` of a build of `request`.
pub(crate) fn encode(request: &RequestRecord, state: &Checkpoint) -> Vec<u8> {
    // Encoding strings, integers and vectors into memory cannot fail.
    let mut bytes =
        bincode::serde::encode_to_vec(LAYOUT, config::standard()).expect("a string encodes");
    let body = bincode::serde::encode_to_vec(Body { request, state }, config::standard())
        .expect("a checkpoint of integers and vectors encodes");
    bytes.extend_from_slice(&body);
    bytes
}

/// The saved state, if `bytes` is a payload of this layout saved for exactly `request`;
/// `None` for any other payload (another request, an older layout, unreadable bytes).
pub(crate) fn decode(bytes: &[u8], request: &RequestRecord) -> Option<Checkpoint> {
    let (layout, used) =
        bincode::serde::decode_from_slice::<String, _>(bytes, config::standard()).ok()?;
    if layout != LAYOUT {
        return None;
    }
    let rest = bytes.get(used..)?;
    let (body, read) =
        bincode::serde::decode_from_slice::<ReadBody, _>(rest, config::standard()).ok()?;
    (read == rest.len() && body.request == *request).then_some(body.state)
}

#[cfg(test)]
mod tests {
    use super::*;
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
            elements: vec![vec![1, -1, 0], vec![0, 1, -1]],
            symmetric: vec![true, false],
        }
    }

    #[test]
    fn a_state_reads_back_only_for_its_own_request() {
        let bytes = encode(&request(Some(4)), &state());
        assert_eq!(decode(&bytes, &request(Some(4))), Some(state()));
        assert_eq!(decode(&bytes, &request(None)), None);
        assert_eq!(decode(&bytes, &request(Some(5))), None);
    }

    #[test]
    fn the_bare_state_of_layout_1_and_cut_payloads_are_not_read() {
        let bare = bincode::serde::encode_to_vec(state(), config::standard()).unwrap();
        assert_eq!(decode(&bare, &request(Some(4))), None);
        let bytes = encode(&request(Some(4)), &state());
        for cut in 0..bytes.len() {
            assert_eq!(
                decode(&bytes[..cut], &request(Some(4))),
                None,
                "cut at {cut}"
            );
        }
        let mut longer = bytes.clone();
        longer.push(0);
        assert_eq!(decode(&longer, &request(Some(4))), None);
    }
}
