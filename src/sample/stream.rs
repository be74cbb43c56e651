//! The documented random stream: ChaCha8 (`rand_chacha`), seeded with `seed_from_u64`;
//! a uniform number is the top 53 bits of one `next_u64` divided by 2^53, so it lies in
//! [0, 1) on the grid of 2^-53.

use rand_chacha::ChaCha8Rng;
use rand_core::{RngCore, SeedableRng};

/// One reproducible stream of uniform numbers.
pub struct Stream {
    rng: ChaCha8Rng,
}

impl Stream {
    /// Stream `index` of the generator seeded with `seed` (0 for `sample`, r + 1 for the
    /// r-th bootstrap replicate).
    pub fn new(seed: u64, index: u64) -> Stream {
        let mut rng = ChaCha8Rng::seed_from_u64(seed);
        rng.set_stream(index);
        Stream { rng }
    }

    pub fn uniform(&mut self) -> f64 {
        uniform(self.rng.next_u64())
    }
}

/// The top 53 bits of `bits` as a number in [0, 1).
pub fn uniform(bits: u64) -> f64 {
    (bits >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_stream_is_reproducible_and_streams_differ() {
        let a: Vec<f64> = (0..4)
            .map({
                let mut s = Stream::new(7, 0);
                move |_| s.uniform()
            })
            .collect();
        let b: Vec<f64> = (0..4)
            .map({
                let mut s = Stream::new(7, 0);
                move |_| s.uniform()
            })
            .collect();
        let c: Vec<f64> = (0..4)
            .map({
                let mut s = Stream::new(7, 1);
                move |_| s.uniform()
            })
            .collect();
        assert_eq!(a, b);
        assert_ne!(a, c);
        assert!(a.iter().all(|u| (0.0..1.0).contains(u)));
        assert_eq!(uniform(u64::MAX), 1.0 - 2f64.powi(-53));
        assert_eq!(uniform(0), 0.0);
    }
}
