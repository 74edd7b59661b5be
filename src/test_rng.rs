//! A seeded pseudo-random generator for the core's unit tests: a 64-bit linear
//! congruential generator with Knuth's MMIX constants. Reproducible, not statistically
//! strong; the tests use its high bits only.

/// The generator's state; `Lcg(seed)` starts it.
pub(crate) struct Lcg(pub(crate) u64);

impl Lcg {
    /// Advances the state and returns it (take the high bits).
    pub(crate) fn step(&mut self) -> u64 {
        self.0 = self
            .0
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        self.0
    }

    /// The high 32 bits of the next state.
    pub(crate) fn next_u32(&mut self) -> u32 {
        #[allow(clippy::cast_possible_truncation)]
        let high = (self.step() >> 32) as u32;
        high
    }
}
