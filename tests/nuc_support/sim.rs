//! A seeded simulator of an invented uncooled 8-14 um microbolometer camera (160 x 120),
//! shared by the non-uniformity tests and the `nuc_demo` example. It lives with the tests,
//! never in the library. Everything here is invented: no real instrument is described.
//!
//! Model of pixel p (counts, before quantisation to u16):
//!
//! ```text
//! n_p = r_p (1 + alpha dT) [L_scene - L(T_int)] + o_p + (k + s_p) dT + c_p L_scene^2 + noise
//! dT  = T_fpa - 303 K,   L_scene = e L(T) + (1 - e) L(T_r)   (exact band radiance)
//! ```
//!
//! with per-pixel responsivity r_p (5 % spread), offset o_p (300 counts spread), offset
//! drift slope k + s_p, a small quadratic term c_p, and Gaussian temporal noise; plus
//! dead pixels (stuck at the low rail), stuck pixels (a constant mid-scale value) and
//! noisy pixels (10x the noise).
#![allow(dead_code)]

use bandtemp::band::{Band, SignalCurve};
use bandtemp::planck::Detector;

/// splitmix64 with Box-Muller normals: deterministic for a seed on every platform.
pub struct Rng(u64);

impl Rng {
    pub fn new(seed: u64) -> Self {
        Rng(seed)
    }
    pub fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    /// Uniform in (0, 1).
    pub fn uniform(&mut self) -> f64 {
        ((self.next_u64() >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }
    pub fn normal(&mut self) -> f64 {
        let (u, v) = (self.uniform(), self.uniform());
        (-2.0 * u.ln()).sqrt() * (2.0 * std::f64::consts::PI * v).cos()
    }
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Defect {
    None,
    Dead,
    Stuck,
    Noisy,
}

pub const WIDTH: usize = 160;
pub const HEIGHT: usize = 120;
pub const REFERENCE_FPA_K: f64 = 303.0;
/// Mean responsivity, counts per W m^-2 sr^-1.
pub const RESPONSIVITY: f64 = 120.0;
/// Temporal noise of a good pixel, counts rms.
pub const NOISE: f64 = 2.0;
/// Relative responsivity drift per K of array temperature.
pub const ALPHA: f64 = -0.004;
/// Common offset drift, counts per K of array temperature.
pub const OFFSET_DRIFT: f64 = 90.0;

pub struct Camera {
    pub band: Band<'static>,
    pub gain: Vec<f64>,
    pub offset: Vec<f64>,
    pub slope: Vec<f64>,
    pub quad: Vec<f64>,
    pub noise: Vec<f64>,
    pub defect: Vec<Defect>,
    rng: Rng,
}

impl Camera {
    pub fn new(seed: u64) -> Camera {
        let mut rng = Rng::new(seed);
        let n = WIDTH * HEIGHT;
        let mut cam = Camera {
            band: Band::rectangular(8.0, 14.0, Detector::Energy).unwrap(),
            gain: Vec::with_capacity(n),
            offset: Vec::with_capacity(n),
            slope: Vec::with_capacity(n),
            quad: Vec::with_capacity(n),
            noise: vec![NOISE; n],
            defect: vec![Defect::None; n],
            rng: Rng::new(seed ^ 0x5EED),
        };
        for _ in 0..n {
            cam.gain.push(RESPONSIVITY * (1.0 + 0.05 * rng.normal()));
            cam.offset.push(9000.0 + 300.0 * rng.normal());
            cam.slope.push(2.0 * rng.normal());
            cam.quad.push(0.002 * rng.normal());
        }
        // A few defects at seeded places (never two on one pixel).
        let place = |kind: Defect, count: usize, cam: &mut Camera, rng: &mut Rng| {
            let mut left = count;
            while left > 0 {
                let p = (rng.next_u64() % n as u64) as usize;
                if cam.defect[p] == Defect::None {
                    cam.defect[p] = kind;
                    left -= 1;
                }
            }
        };
        place(Defect::Dead, 6, &mut cam, &mut rng);
        place(Defect::Stuck, 6, &mut cam, &mut rng);
        place(Defect::Noisy, 8, &mut cam, &mut rng);
        for p in 0..n {
            if cam.defect[p] == Defect::Noisy {
                cam.noise[p] = 10.0 * NOISE;
            }
        }
        cam
    }

    /// Scene radiance of a grey surface, W m^-2 sr^-1.
    pub fn scene_radiance(&self, object_k: f64, emissivity: f64, reflected_k: f64) -> f64 {
        emissivity * self.band.signal(object_k).unwrap()
            + (1.0 - emissivity) * self.band.signal(reflected_k).unwrap()
    }

    /// Noise-free counts of pixel p (before quantisation).
    pub fn ideal(&self, p: usize, radiance: f64, fpa_k: f64, internal_k: f64) -> f64 {
        let internal = self.band.signal(internal_k).unwrap();
        self.ideal_with(p, radiance, fpa_k, internal)
    }

    /// As [`Camera::ideal`] with the internal radiance L(T_int) given.
    fn ideal_with(&self, p: usize, radiance: f64, fpa_k: f64, internal: f64) -> f64 {
        let dt = fpa_k - REFERENCE_FPA_K;
        self.gain[p] * (1.0 + ALPHA * dt) * (radiance - internal)
            + self.offset[p]
            + (OFFSET_DRIFT + self.slope[p]) * dt
            + self.quad[p] * radiance * radiance
    }

    /// One raw frame: `radiance[p]` the scene radiance at pixel p.
    pub fn frame(&mut self, radiance: &[f64], fpa_k: f64, internal_k: f64) -> Vec<u16> {
        let internal = self.band.signal(internal_k).unwrap();
        (0..WIDTH * HEIGHT)
            .map(|p| match self.defect[p] {
                Defect::Dead => 0,
                Defect::Stuck => 12_345,
                _ => {
                    let n = self.ideal_with(p, radiance[p], fpa_k, internal)
                        + self.noise[p] * self.rng.normal();
                    n.round().clamp(0.0, 65535.0) as u16
                }
            })
            .collect()
    }

    /// A flat-field frame (a blackbody filling the view at `bb_k`).
    pub fn flat(&mut self, bb_k: f64, fpa_k: f64, internal_k: f64) -> Vec<u16> {
        let l = self.band.signal(bb_k).unwrap();
        let radiance = vec![l; WIDTH * HEIGHT];
        self.frame(&radiance, fpa_k, internal_k)
    }
}

/// The internal (housing and lens) temperature of the invented camera at an array
/// temperature: 1.5 K below the array in equilibrium.
pub fn internal_k(fpa_k: f64) -> f64 {
    fpa_k - 1.5
}
