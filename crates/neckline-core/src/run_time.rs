//! When an output was generated: the instant in UTC and the machine's local offset (read from
//! the zone files, RFC 8536), written as ISO 8601. At the bottom of the crate, so that an
//! analysis and a comparison carry their time without reaching up to the writers.

use std::path::{Path, PathBuf};

/// The instant an output was generated: seconds since 1970-01-01T00:00:00Z and the offset of
/// the machine's local time from UTC at that instant, when known.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct RunTime {
    /// Seconds since the Unix epoch, UTC.
    pub utc_secs: u64,
    /// Local time minus UTC, seconds (`None` when the local zone could not be read).
    pub offset_secs: Option<i32>,
}

impl RunTime {
    /// Now, with the local offset read from the time-zone database.
    pub fn now() -> Self {
        let utc_secs = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.as_secs());
        RunTime {
            utc_secs,
            offset_secs: local_offset(utc_secs),
        }
    }

    /// UTC as ISO 8601: `2026-11-30T14:05:09Z`.
    pub fn utc(&self) -> String {
        iso8601(self.utc_secs)
    }

    /// Local time as ISO 8601 with its offset (`2026-11-30T15:05:09+01:00`), when known.
    pub fn local(&self) -> Option<String> {
        let off = self.offset_secs?;
        let local = self.utc_secs.checked_add_signed(i64::from(off))?;
        let iso = iso8601(local);
        Some(format!("{}{}", &iso[..iso.len() - 1], offset_text(off)))
    }

    /// "2026-11-30T14:05:09Z, local UTC+01:00", or ", local offset not known".
    pub fn text(&self) -> String {
        match self.offset_secs {
            Some(off) => format!("{}, local UTC{}", self.utc(), offset_text(off)),
            None => format!("{}, local offset not known", self.utc()),
        }
    }
}

/// An offset from UTC as `+hh:mm` / `-hh:mm` (ISO 8601).
pub fn offset_text(secs: i32) -> String {
    let sign = if secs < 0 { '-' } else { '+' };
    let m = secs.unsigned_abs() / 60;
    format!("{sign}{:02}:{:02}", m / 60, m % 60)
}

/// The local offset at `utc_secs` from the zone named by `TZ` (a zone name or a path, as the
/// C library reads it) or else `/etc/localtime`; `None` when neither can be read.
fn local_offset(utc_secs: u64) -> Option<i32> {
    let path = match std::env::var("TZ") {
        Ok(tz) if tz.is_empty() || tz == "UTC" || tz == "UTC0" || tz == "GMT" => return Some(0),
        Ok(tz) => {
            let name = tz.trim_start_matches(':');
            if name.starts_with('/') {
                PathBuf::from(name)
            } else {
                Path::new("/usr/share/zoneinfo").join(name)
            }
        }
        Err(_) => PathBuf::from("/etc/localtime"),
    };
    let bytes = std::fs::read(path).ok()?;
    tzif_offset(&bytes, i64::try_from(utc_secs).ok()?)
}

/// The UTC offset in force at `at` (seconds since the epoch) in a TZif file (RFC 8536: the
/// "TZif" header with six counts, then transition times, their type indices and the local
/// time types of six bytes each: offset i32, is-DST, name index). Version 2 and later files
/// carry a second block with 64-bit times, which is read when present. The last transition at
/// or before `at` decides; before the first, or with none, the first type does. The footer's
/// rule for times after the last transition is not read: its last type is taken.
pub fn tzif_offset(b: &[u8], at: i64) -> Option<i32> {
    let counts = |h: &[u8]| -> Option<[usize; 6]> {
        if h.get(..4)? != b"TZif" {
            return None;
        }
        let mut c = [0usize; 6];
        for (k, v) in c.iter_mut().enumerate() {
            let s = 20 + 4 * k;
            *v = u32::from_be_bytes(h.get(s..s + 4)?.try_into().ok()?) as usize;
        }
        Some(c)
    };
    let block_len = |c: [usize; 6], t: usize| {
        let [isut, isstd, leap, time, typ, chr] = c;
        time * t + time + typ * 6 + chr + leap * (t + 4) + isstd + isut
    };
    let c1 = counts(b)?;
    let version = *b.get(4)?;
    let (data, c, t) = if version >= b'2' {
        let second = 44 + block_len(c1, 4);
        let h2 = b.get(second..)?;
        (h2.get(44..)?, counts(h2)?, 8)
    } else {
        (b.get(44..)?, c1, 4)
    };
    let [_, _, _, time, typ, _] = c;
    if typ == 0 {
        return None;
    }
    let when = |k: usize| -> Option<i64> {
        let s = data.get(k * t..(k + 1) * t)?;
        Some(if t == 8 {
            i64::from_be_bytes(s.try_into().ok()?)
        } else {
            i64::from(i32::from_be_bytes(s.try_into().ok()?))
        })
    };
    let mut idx = 0usize;
    for k in 0..time {
        if when(k)? <= at {
            idx = usize::from(*data.get(time * t + k)?);
        } else {
            break;
        }
    }
    let s = time * t + time + idx * 6;
    Some(i32::from_be_bytes(data.get(s..s + 4)?.try_into().ok()?))
}

/// Now, UTC, as ISO 8601 (`2026-11-30T14:05:09Z`).
pub fn utc_now() -> String {
    let secs = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| d.as_secs());
    iso8601(secs)
}

/// Seconds since 1970-01-01T00:00:00Z as ISO 8601 UTC. Days to a civil date by H. Hinnant's
/// `civil_from_days` ("chrono-Compatible Low-Level Date Algorithms", proleptic Gregorian).
pub fn iso8601(secs: u64) -> String {
    let days = (secs / 86_400) as i64;
    let rem = secs % 86_400;
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z - era * 146_097;
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = doy - (153 * mp + 2) / 5 + 1;
    let m = if mp < 10 { mp + 3 } else { mp - 9 };
    let y = yoe + era * 400 + i64::from(m <= 2);
    format!(
        "{y:04}-{m:02}-{d:02}T{:02}:{:02}:{:02}Z",
        rem / 3600,
        rem % 3600 / 60,
        rem % 60
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    // Reference instants: the Unix epoch; 2000-02-29 (a leap day of a century year divisible by
    // 400) = 951 782 400 s; 2038-01-19T03:14:08Z = 2^31 s (the 32-bit time_t rollover).
    #[test]
    fn iso8601_of_known_instants() {
        assert_eq!(iso8601(0), "1970-01-01T00:00:00Z");
        assert_eq!(iso8601(951_782_400), "2000-02-29T00:00:00Z");
        assert_eq!(iso8601(1 << 31), "2038-01-19T03:14:08Z");
        assert!(crate::job::is_date(&utc_now()[..10]));
    }

    // RFC 8536 §3: a version 1 TZif file: magic "TZif", version 0, 15 unused bytes, then
    // isutcnt, isstdcnt, leapcnt, timecnt, typecnt, charcnt (big-endian u32); transition times
    // (i32), their type indices (u8), the types (i32 offset, u8 isdst, u8 name index), names.
    fn tzif_v1(times: &[i32], idx: &[u8], types: &[i32]) -> Vec<u8> {
        let mut b = b"TZif".to_vec();
        b.push(0);
        b.extend([0u8; 15]);
        for n in [0, 0, 0, times.len(), types.len(), 4] {
            b.extend((n as u32).to_be_bytes());
        }
        for t in times {
            b.extend(t.to_be_bytes());
        }
        b.extend(idx);
        for o in types {
            b.extend(o.to_be_bytes());
            b.extend([0u8, 0u8]);
        }
        b.extend(b"XYZ\0");
        b
    }

    #[test]
    fn tzif_offsets_follow_transitions() {
        // A zone at UTC+1 that moves to UTC+2 at t = 1000 s and back at t = 2000 s.
        let b = tzif_v1(&[1000, 2000], &[1, 0], &[3600, 7200]);
        assert_eq!(tzif_offset(&b, 10), Some(3600));
        assert_eq!(tzif_offset(&b, 1500), Some(7200));
        assert_eq!(tzif_offset(&b, 5000), Some(3600));
        assert_eq!(tzif_offset(b"not a zone file", 0), None);
        // UTC as the C library's zone database writes it: no transitions, one type of 0.
        assert_eq!(tzif_offset(&tzif_v1(&[], &[], &[0]), 0), Some(0));
    }

    // ISO 8601 writes offsets as ±hh:mm; India is UTC+05:30, Newfoundland UTC−03:30 (from
    // memory).
    #[test]
    fn offsets_and_local_times_read_as_iso_8601() {
        assert_eq!(offset_text(19_800), "+05:30");
        assert_eq!(offset_text(-12_600), "-03:30");
        let t = RunTime {
            utc_secs: 951_782_400,
            offset_secs: Some(3600),
        };
        assert_eq!(t.utc(), "2000-02-29T00:00:00Z");
        assert_eq!(t.local().unwrap(), "2000-02-29T01:00:00+01:00");
        assert_eq!(t.text(), "2000-02-29T00:00:00Z, local UTC+01:00");
        let unknown = RunTime {
            offset_secs: None,
            ..t
        };
        assert!(unknown.text().ends_with("local offset not known"));
    }
}
