//! The byte coding of the priors cache: little-endian numbers, length-prefixed strings
//! and arrays, written into one buffer. They are read back by a cursor over the small
//! head (provenance, attributes) and by [`Stream`], which reads each column straight
//! from the file into the `Vec` that is kept, hashing it on the way; both refuse
//! anything out of bounds (every read returns `None` rather than panic). Floats are
//! stored as their bits, so every value comes back exactly.

use super::file::{Calibration, PrivacySpec, Provenance};
use super::model::{AttrValue, Attribute};

#[derive(Default)]
pub(crate) struct Writer {
    pub buf: Vec<u8>,
}

impl Writer {
    pub fn u8(&mut self, v: u8) {
        self.buf.push(v);
    }
    pub fn u64(&mut self, v: u64) {
        self.buf.extend_from_slice(&v.to_le_bytes());
    }
    pub fn f64(&mut self, v: f64) {
        self.u64(v.to_bits());
    }
    pub fn bytes(&mut self, b: &[u8]) {
        self.u64(b.len() as u64);
        self.buf.extend_from_slice(b);
    }
    pub fn str(&mut self, s: &str) {
        self.bytes(s.as_bytes());
    }
    pub fn opt_str(&mut self, s: Option<&str>) {
        self.u8(s.is_some() as u8);
        if let Some(s) = s {
            self.str(s);
        }
    }
    pub fn f64s(&mut self, v: &[f64]) {
        self.u64(v.len() as u64);
        v.iter()
            .for_each(|x| self.buf.extend_from_slice(&x.to_le_bytes()));
    }
    pub fn u64s(&mut self, v: &[u64]) {
        self.u64(v.len() as u64);
        v.iter()
            .for_each(|x| self.buf.extend_from_slice(&x.to_le_bytes()));
    }
    pub fn u32s(&mut self, v: &[u32]) {
        self.u64(v.len() as u64);
        v.iter()
            .for_each(|x| self.buf.extend_from_slice(&x.to_le_bytes()));
    }
    pub fn u16s(&mut self, v: &[u16]) {
        self.u64(v.len() as u64);
        v.iter()
            .for_each(|x| self.buf.extend_from_slice(&x.to_le_bytes()));
    }

    pub fn provenance(&mut self, p: &Provenance) {
        self.str(&p.source);
        self.str(&p.licence);
        self.str(&p.created);
        self.str(&p.method);
        self.u8(p.synthetic as u8);
        self.u8(p.contributors.is_some() as u8);
        self.u64(p.contributors.unwrap_or(0));
        self.u8(p.privacy.is_some() as u8);
        if let Some(s) = &p.privacy {
            self.str(&s.mechanism);
            self.f64(s.epsilon);
            self.f64(s.sensitivity);
            self.f64(s.min_members);
            self.str(&s.budget_split);
            for x in [s.item_noise_scale, s.item_noise_variance] {
                self.u8(x.is_some() as u8);
                self.f64(x.unwrap_or(0.0));
            }
            self.u8(s.warning.is_some() as u8);
            self.str(s.warning.as_deref().unwrap_or(""));
        }
    }

    pub fn attribute(&mut self, a: &Attribute) {
        self.str(&a.id);
        self.str(&a.label);
        self.u64(a.values.len() as u64);
        for v in &a.values {
            self.str(&v.id);
            self.str(&v.label);
        }
        self.f64s(&a.base_rates);
        self.f64s(&a.log_base);
        self.f64s(&a.member_rates);
        self.f64(a.threshold);
        self.f64(a.smoothing);
        self.f64(a.pseudocount);
        self.opt_str(a.special_category.as_deref());
        match &a.calibration {
            Calibration::Temperature { lambda } => {
                self.u8(0);
                self.f64(*lambda);
            }
            Calibration::Logistic {
                lambda,
                intercept,
                log_odds,
                log_base_rate,
                evidence_spread,
            } => {
                self.u8(1);
                for x in [lambda, intercept, log_odds, log_base_rate, evidence_spread] {
                    self.f64(*x);
                }
            }
        }
    }
}

pub(crate) struct Reader<'b> {
    buf: &'b [u8],
    at: usize,
}

impl<'b> Reader<'b> {
    pub fn new(buf: &'b [u8]) -> Reader<'b> {
        Reader { buf, at: 0 }
    }

    pub fn at_end(&self) -> bool {
        self.at == self.buf.len()
    }

    pub fn take(&mut self, n: usize) -> Option<&'b [u8]> {
        let end = self.at.checked_add(n)?;
        let s = self.buf.get(self.at..end)?;
        self.at = end;
        Some(s)
    }
    pub fn u8(&mut self) -> Option<u8> {
        Some(self.take(1)?[0])
    }
    pub fn u64(&mut self) -> Option<u64> {
        Some(u64::from_le_bytes(self.take(8)?.try_into().ok()?))
    }
    pub fn f64(&mut self) -> Option<f64> {
        Some(f64::from_bits(self.u64()?))
    }
    pub fn bool(&mut self) -> Option<bool> {
        match self.u8()? {
            0 => Some(false),
            1 => Some(true),
            _ => None,
        }
    }
    pub fn bytes(&mut self) -> Option<&'b [u8]> {
        let n = usize::try_from(self.u64()?).ok()?;
        self.take(n)
    }
    pub fn str(&mut self) -> Option<&'b str> {
        std::str::from_utf8(self.bytes()?).ok()
    }
    pub fn string(&mut self) -> Option<String> {
        self.str().map(str::to_string)
    }
    fn array(&mut self, width: usize) -> Option<&'b [u8]> {
        let n = usize::try_from(self.u64()?).ok()?;
        self.take(n.checked_mul(width)?)
    }
    pub fn f64s(&mut self) -> Option<Vec<f64>> {
        Some(
            self.array(8)?
                .chunks_exact(8)
                .map(|c| f64::from_le_bytes(le8(c)))
                .collect(),
        )
    }

    pub fn provenance(&mut self) -> Option<Provenance> {
        let (source, licence, created, method) = (
            self.string()?,
            self.string()?,
            self.string()?,
            self.string()?,
        );
        let synthetic = self.bool()?;
        let has_contributors = self.bool()?;
        let contributors = self.u64()?;
        let privacy = if self.bool()? {
            let (mechanism, epsilon, sensitivity, min_members, budget_split) = (
                self.string()?,
                self.f64()?,
                self.f64()?,
                self.f64()?,
                self.string()?,
            );
            let (has_scale, scale) = (self.bool()?, self.f64()?);
            let (has_variance, variance) = (self.bool()?, self.f64()?);
            let (has_warning, warning) = (self.bool()?, self.string()?);
            Some(PrivacySpec {
                mechanism,
                epsilon,
                sensitivity,
                min_members,
                budget_split,
                item_noise_scale: has_scale.then_some(scale),
                item_noise_variance: has_variance.then_some(variance),
                warning: has_warning.then_some(warning),
            })
        } else {
            None
        };
        Some(Provenance {
            source,
            licence,
            created,
            method,
            synthetic,
            contributors: has_contributors.then_some(contributors),
            privacy,
        })
    }

    pub fn attribute(&mut self) -> Option<Attribute> {
        let id = self.string()?;
        let label = self.string()?;
        let n = usize::try_from(self.u64()?).ok()?;
        // Each value takes at least 16 bytes: a count that cannot fit is refused
        // before anything is reserved for it.
        if n > self.buf.len() / 16 {
            return None;
        }
        let mut values = Vec::with_capacity(n);
        for _ in 0..n {
            values.push(AttrValue {
                id: self.string()?,
                label: self.string()?,
            });
        }
        let base_rates = self.f64s()?;
        let log_base = self.f64s()?;
        let member_rates = self.f64s()?;
        if [&base_rates, &log_base, &member_rates]
            .iter()
            .any(|v| v.len() != n)
            || n < 2
        {
            return None;
        }
        let threshold = self.f64()?;
        let smoothing = self.f64()?;
        let pseudocount = self.f64()?;
        let special_category = if self.bool()? {
            Some(self.string()?)
        } else {
            None
        };
        let calibration = match self.u8()? {
            0 => Calibration::Temperature {
                lambda: self.f64()?,
            },
            1 => Calibration::Logistic {
                lambda: self.f64()?,
                intercept: self.f64()?,
                log_odds: self.f64()?,
                log_base_rate: self.f64()?,
                evidence_spread: self.f64()?,
            },
            _ => return None,
        };
        Some(Attribute {
            id,
            label,
            values,
            base_rates,
            log_base,
            member_rates,
            threshold,
            smoothing,
            pseudocount,
            special_category,
            calibration,
        })
    }
}

fn le8(c: &[u8]) -> [u8; 8] {
    let mut b = [0u8; 8];
    b.copy_from_slice(c);
    b
}

/// A fixed-width little-endian number the cache stores in arrays, read straight into
/// its final `Vec` (its bytes as they are on disk) and put in native order after.
pub(crate) trait Word: bytemuck::Pod {
    fn le_to_native(&mut self);
}

macro_rules! word {
    ($($t:ty),*) => {$(
        impl Word for $t {
            fn le_to_native(&mut self) {
                *self = <$t>::from_le_bytes(self.to_ne_bytes());
            }
        }
    )*};
}
word!(u8, u16, u32, u64, f64);

/// Reads the cache payload section by section straight into the buffers that are kept,
/// so nothing is held twice, hashing every byte (BLAKE3, over both cores for large
/// sections) as it comes in. Never reads past the payload length it was given, and
/// never reserves more than what is left of it; every read returns `None` rather than
/// panic.
pub(crate) struct Stream<R> {
    from: R,
    left: u64,
    hasher: blake3::Hasher,
}

/// Sections at least this long are hashed over all cores (BLAKE3's tree mode, the same
/// hash as one core gives).
const PARALLEL_FROM: usize = 1 << 20;

impl<R: std::io::Read> Stream<R> {
    pub fn new(from: R, len: u64) -> Stream<R> {
        Stream {
            from,
            left: len,
            hasher: blake3::Hasher::new(),
        }
    }

    /// Fill `out` from the payload and hash it. A section is read whole and then
    /// hashed in one call: each call over all cores wakes the other threads, and on a
    /// virtual machine the wake-ups of hashing a 167 MB cache in 1 MiB steps cost more
    /// than reading each section back from memory once.
    fn fill(&mut self, out: &mut [u8]) -> Option<()> {
        if out.len() as u64 > self.left {
            return None;
        }
        self.from.read_exact(out).ok()?;
        if out.len() >= PARALLEL_FROM {
            self.hasher.update_rayon(out);
        } else {
            self.hasher.update(out);
        }
        self.left -= out.len() as u64;
        Some(())
    }

    pub fn u64(&mut self) -> Option<u64> {
        let mut b = [0u8; 8];
        self.fill(&mut b)?;
        Some(u64::from_le_bytes(b))
    }

    /// A length-prefixed array of `T`, straight into its `Vec`.
    pub fn array<T: Word>(&mut self) -> Option<Vec<T>> {
        let n = usize::try_from(self.u64()?).ok()?;
        let bytes = n.checked_mul(std::mem::size_of::<T>())?;
        if bytes as u64 > self.left {
            return None;
        }
        let mut v = vec![T::zeroed(); n];
        self.fill(bytemuck::cast_slice_mut(&mut v))?;
        if cfg!(target_endian = "big") {
            v.iter_mut().for_each(Word::le_to_native);
        }
        Some(v)
    }

    /// A length-prefixed UTF-8 text (checked).
    pub fn string(&mut self) -> Option<String> {
        String::from_utf8(self.array::<u8>()?).ok()
    }

    pub fn at_end(&self) -> bool {
        self.left == 0
    }

    /// Hash whatever is left of the payload (after a section that could not be read,
    /// to tell a damaged cache from an inconsistent one) and return the checksum, or
    /// `None` if the payload ends early.
    pub fn finish(mut self) -> Option<blake3::Hash> {
        let mut buf = vec![0u8; 4 * PARALLEL_FROM];
        while self.left > 0 {
            let n = self.left.min(buf.len() as u64) as usize;
            self.fill(&mut buf[..n])?;
        }
        Some(self.hasher.finalize())
    }
}
