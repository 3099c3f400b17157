//! Content fingerprints: FNV-1a (Fowler–Noll–Vo, 64-bit) over bytes and words, for cache keys and
//! library identity. An identity of content, not a security hash.

/// FNV-1a over bytes and 64-bit words (each length-prefixed or fixed-size, so distinct inputs do
/// not run together).
pub(crate) struct Fnv(u64);

impl Fnv {
    pub(crate) fn new() -> Self {
        Fnv(0xcbf2_9ce4_8422_2325)
    }

    fn byte(&mut self, b: u8) {
        self.0 = (self.0 ^ b as u64).wrapping_mul(0x0000_0100_0000_01b3);
    }

    pub(crate) fn word(&mut self, w: u64) {
        for b in w.to_le_bytes() {
            self.byte(b);
        }
    }

    pub(crate) fn bytes(&mut self, bytes: &[u8]) {
        self.word(bytes.len() as u64);
        for &b in bytes {
            self.byte(b);
        }
    }

    /// Like [`Fnv::bytes`] but one FNV-1a step per 8-byte little-endian word (the tail zero
    /// padded): eight times fewer dependent multiplies, for per-stroke cache keys over whole grids.
    /// Not the published FNV of the bytes, so never for a stored hash.
    pub(crate) fn bytes_wide(&mut self, bytes: &[u8]) {
        self.word(bytes.len() as u64);
        for chunk in bytes.chunks(8) {
            let mut w = [0u8; 8];
            w[..chunk.len()].copy_from_slice(chunk);
            self.0 = (self.0 ^ u64::from_le_bytes(w)).wrapping_mul(0x0000_0100_0000_01b3);
        }
    }

    pub(crate) fn finish(&self) -> u64 {
        self.0
    }
}

#[cfg(test)]
mod tests {
    use super::Fnv;

    /// FNV-1a 64-bit reference values from the FNV authors' test suite (Fowler, Noll & Vo;
    /// isthe.com/chongo/tech/comp/fnv): "" → cbf29ce484222325, "a" → af63dc4c8601ec8c,
    /// "foobar" → 85944171f73967e8.
    #[test]
    fn matches_the_published_fnv1a_values() {
        for (text, want) in [
            ("", 0xcbf2_9ce4_8422_2325u64),
            ("a", 0xaf63_dc4c_8601_ec8c),
            ("foobar", 0x8594_4171_f739_67e8),
        ] {
            let mut h = Fnv::new();
            text.bytes().for_each(|b| h.byte(b));
            assert_eq!(h.finish(), want, "{text:?}");
        }
    }

    /// The wide form still tells grids apart that differ in one byte anywhere, tail included.
    #[test]
    fn wide_bytes_see_every_byte() {
        let base: Vec<u8> = (0..21).collect();
        let hash = |b: &[u8]| {
            let mut h = Fnv::new();
            h.bytes_wide(b);
            h.finish()
        };
        for i in 0..base.len() {
            let mut other = base.clone();
            other[i] ^= 1;
            assert_ne!(hash(&base), hash(&other), "byte {i}");
        }
        assert_ne!(hash(&base), hash(&base[..20]));
    }
}
