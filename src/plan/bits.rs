//! A fixed-size bit set over candidate indices, used by the search to mark which
//! candidates a branch has decided (hidden or kept visible).

#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) struct Bits(Vec<u64>);

impl Bits {
    pub fn new(n: usize) -> Bits {
        Bits(vec![0; n.div_ceil(64)])
    }

    pub fn get(&self, i: usize) -> bool {
        self.0[i / 64] >> (i % 64) & 1 == 1
    }

    pub fn set(&mut self, i: usize) {
        self.0[i / 64] |= 1 << (i % 64);
    }
}

#[cfg(test)]
mod tests {
    use super::Bits;

    #[test]
    fn set_and_get_across_words() {
        let mut b = Bits::new(130);
        for i in [0, 63, 64, 129] {
            assert!(!b.get(i));
            b.set(i);
            assert!(b.get(i));
        }
        assert!(!b.get(1) && !b.get(65) && !b.get(128));
    }
}
