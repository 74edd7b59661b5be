//! The parallel frame conversion (feature `std`) against the serial one: every pixel bit
//! for bit and the summary equal, for uniform scenes and emissivity maps, frames whose
//! length is no multiple of the chunk size, and any thread count.

use bandtemp::band::Band;
use bandtemp::frame::{CountsMap, FrameConverter, Rails, TemperatureRange, MAX_THREADS};
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use bandtemp::Error;
use std::num::NonZeroUsize;

/// A seeded linear congruential generator (Knuth's MMIX constants): the invented frames.
struct Lcg(u64);

impl Lcg {
    fn next(&mut self) -> u32 {
        self.0 = self
            .0
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        (self.0 >> 33) as u32
    }
}

#[test]
fn every_pixel_and_the_summary_equal_the_serial_conversion() {
    // An invented 8-14 um imager: counts = 30000 + 400 (L - L(300 K)) W^-1 m^2 sr.
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let scene = Scene::new(0.95, 293.15)
        .unwrap()
        .with_atmosphere(0.98, 293.15)
        .unwrap();
    let gain = 1.0 / 400.0;
    let counts_map =
        CountsMap::linear(gain, band.radiance(300.0).unwrap() - 30_000.0 * gain).unwrap();
    let mut rows = vec![[0.0f32; 4]; 2048];
    let converter = FrameConverter::new(
        &band,
        &scene,
        counts_map,
        Rails::new(100, 65_000).unwrap(),
        TemperatureRange::new(250.0, 600.0).unwrap(),
        1e-3,
        &mut rows,
    )
    .unwrap();
    let mut rng = Lcg(20_261_203);
    for pixels in [0usize, 1, 15, 17, 1000, 640 * 512 + 3] {
        let counts: Vec<u16> = (0..pixels).map(|_| (rng.next() % 65_536) as u16).collect();
        let emissivity: Vec<f32> = (0..pixels)
            .map(|_| 0.05 + 0.95 * (rng.next() % 1000) as f32 / 999.0)
            .collect();
        for map in [None, Some(&emissivity[..])] {
            let mut serial = vec![0.0f32; pixels];
            let want = converter.convert_counts(&counts, map, &mut serial).unwrap();
            for threads in [1, 2, 3, 7, MAX_THREADS, MAX_THREADS + 5] {
                let mut parallel = vec![-1.0f32; pixels];
                let got = converter
                    .convert_counts_parallel(
                        &counts,
                        map,
                        &mut parallel,
                        NonZeroUsize::new(threads).unwrap(),
                    )
                    .unwrap();
                assert_eq!(got, want, "{pixels} pixels, {threads} threads");
                assert!(
                    serial
                        .iter()
                        .zip(&parallel)
                        .all(|(a, b)| a.to_bits() == b.to_bits()),
                    "{pixels} pixels, {threads} threads"
                );
            }
        }
    }
    // Length errors before any thread starts, the output untouched.
    let counts = [30_000u16; 40];
    let mut kelvin = [7.0f32; 39];
    assert_eq!(
        converter.convert_counts_parallel(&counts, None, &mut kelvin, NonZeroUsize::MIN),
        Err(Error::FrameLengthMismatch)
    );
    assert!(kelvin.iter().all(|&k| k == 7.0));
    let mut kelvin = [7.0f32; 40];
    let short_map = [0.9f32; 39];
    assert_eq!(
        converter.convert_counts_parallel(
            &counts,
            Some(&short_map),
            &mut kelvin,
            NonZeroUsize::new(2).unwrap()
        ),
        Err(Error::FrameLengthMismatch)
    );
    assert!(kelvin.iter().all(|&k| k == 7.0));
}
