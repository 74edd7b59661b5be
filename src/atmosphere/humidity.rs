//! Humidity of the air on the path: saturation vapour pressure over water and over ice,
//! dew point, water-vapour density and the precipitable water of a horizontal path.
//!
//! # Formulas
//! Both formulas are of the Magnus form, with t the temperature in degrees Celsius
//! (t = T - 273.15, T in K) and e in hPa:
//!
//! ```text
//! e_s(t) = a exp(b t / (c + t))                         hPa
//! ```
//!
//! | formula | phase | a (hPa) | b | c (deg C) | range used here |
//! |---|---|---|---|---|---|
//! | [`SaturationFormula::MagnusCimo`] | water | 6.112 | 17.62 | 243.12 | -45..+60 C |
//! | [`SaturationFormula::MagnusCimo`] | ice | 6.112 | 22.46 | 272.62 | -65..0 C |
//! | [`SaturationFormula::Buck1981`] | water | 6.1121 | 17.502 | 240.97 | -40..+50 C |
//! | [`SaturationFormula::Buck1981`] | ice | 6.1115 | 22.452 | 272.55 | -50..0 C |
//!
//! Sources: WMO Guide to Instruments and Methods of Observation (WMO-No. 8, the CIMO guide),
//! Vol. I, Annex 4.B (coefficients after Sonntag 1990); A. L. Buck, "New equations for
//! computing vapor pressure and enhancement factor", J. Appl. Meteorol. 20 (1981) 1527-1532.
//! The coefficients were checked against public implementations that cite these sources; the
//! validity ranges and enhancement factors below are quoted from memory of those documents.
//!
//! In moist air the saturation pressure is raised by the enhancement factor f(p)
//! (p in hPa): CIMO f = 1.0016 + 3.15e-6 p - 0.074 / p; Buck f = 1.0007 + 3.46e-6 p
//! (water), 1.0003 + 4.18e-6 p (ice). It is about 1.004 at sea level.
//!
//! # Accuracy (measured, `tests/atmosphere_humidity.rs`)
//! Against IAPWS-95 (0..50 C, water), IAPWS 2011 sublimation (ice) and Murphy and Koop
//! 2005 (supercooled water): CIMO water within 0.31 % over 0..50 C and 0.58 % down to
//! -40 C (supercooled water, where references themselves differ by some tenths of a per
//! cent); CIMO ice within 0.07 % over -40..0 C; Buck water within 0.15 % over -20..50 C and
//! 0.8 % at -40 C; Buck ice within 0.09 %.
//!
//! # Relative humidity
//! Relative humidity is a **fraction in [0, 1]**, taken with respect to saturation over
//! **liquid water** at all temperatures, as the WMO defines it and as hygrometers report it.
//! The vapour pressure of the air is e = U f(p) e_w(T).
//!
//! # What this leaves out
//! Non-ideal gas effects beyond the enhancement factor; the humidity of air that is not
//! uniform along the path (one temperature, humidity and pressure for the whole path).

use crate::error::{check_temperature_k, finite, Error, Result};

/// 0 degrees Celsius in kelvin.
pub const CELSIUS_ZERO_K: f64 = 273.15;
/// Lowest air pressure accepted, hPa (about 5.5 km altitude).
pub const AIR_PRESSURE_MIN_HPA: f64 = 500.0;
/// Highest air pressure accepted, hPa.
pub const AIR_PRESSURE_MAX_HPA: f64 = 1100.0;
/// Standard sea-level pressure, hPa.
pub const STANDARD_PRESSURE_HPA: f64 = 1013.25;
/// The factor of rho_v = 216.7 e / T: M_w / R * 100 Pa/hPa = 18.015 g/mol / 8.3145 J/(mol K)
/// * 100 = 216.7 g K m^-3 hPa^-1 (water vapour as an ideal gas).
pub const VAPOUR_DENSITY_FACTOR: f64 = 216.7;

/// Which published saturation-vapour-pressure formula to use.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum SaturationFormula {
    /// Magnus form with the coefficients of the WMO CIMO guide (Annex 4.B, after Sonntag
    /// 1990). The default.
    MagnusCimo,
    /// Buck (1981), the three-coefficient fits with Buck's enhancement factors.
    Buck1981,
}

/// The condensed phase that the vapour is in equilibrium with.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Phase {
    /// Plane surface of pure liquid water (supercooled below 0 C).
    Water,
    /// Plane surface of pure ice (only at or below 0 C).
    Ice,
}

/// Magnus coefficients (a hPa, b, c deg C) and the validity range (deg C).
#[derive(Clone, Copy)]
struct Magnus {
    a_hpa: f64,
    b: f64,
    c_c: f64,
    min_c: f64,
    max_c: f64,
}

impl SaturationFormula {
    fn magnus(self, phase: Phase) -> Magnus {
        match (self, phase) {
            (SaturationFormula::MagnusCimo, Phase::Water) => Magnus {
                a_hpa: 6.112,
                b: 17.62,
                c_c: 243.12,
                min_c: -45.0,
                max_c: 60.0,
            },
            (SaturationFormula::MagnusCimo, Phase::Ice) => Magnus {
                a_hpa: 6.112,
                b: 22.46,
                c_c: 272.62,
                min_c: -65.0,
                max_c: 0.0,
            },
            (SaturationFormula::Buck1981, Phase::Water) => Magnus {
                a_hpa: 6.1121,
                b: 17.502,
                c_c: 240.97,
                min_c: -40.0,
                max_c: 50.0,
            },
            (SaturationFormula::Buck1981, Phase::Ice) => Magnus {
                a_hpa: 6.1115,
                b: 22.452,
                c_c: 272.55,
                min_c: -50.0,
                max_c: 0.0,
            },
        }
    }

    /// The range of air temperature this formula covers over `phase`, in K (inclusive).
    #[must_use]
    pub fn range_k(self, phase: Phase) -> (f64, f64) {
        let m = self.magnus(phase);
        (m.min_c + CELSIUS_ZERO_K, m.max_c + CELSIUS_ZERO_K)
    }

    /// Enhancement factor f(p) of moist air (dimensionless, about 1.004 at 1013 hPa).
    ///
    /// CIMO: f = 1.0016 + 3.15e-6 p - 0.074 / p (both phases). Buck 1981:
    /// f = 1.0007 + 3.46e-6 p (water), 1.0003 + 4.18e-6 p (ice); p in hPa.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::AirPressureOutOfRange`] outside
    /// [[`AIR_PRESSURE_MIN_HPA`], [`AIR_PRESSURE_MAX_HPA`]].
    pub fn enhancement_factor(self, phase: Phase, pressure_hpa: f64) -> Result<f64> {
        let p = check_pressure_hpa(pressure_hpa)?;
        Ok(match (self, phase) {
            (SaturationFormula::MagnusCimo, _) => 1.0016 + 3.15e-6 * p - 0.074 / p,
            (SaturationFormula::Buck1981, Phase::Water) => 1.0007 + 3.46e-6 * p,
            (SaturationFormula::Buck1981, Phase::Ice) => 1.0003 + 4.18e-6 * p,
        })
    }

    /// Saturation vapour pressure of pure water vapour over a plane surface of `phase`, hPa:
    /// e_s = a exp(b t / (c + t)), t = T - 273.15 (see the module table for a, b, c).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
    /// [`Error::AirTemperatureOutOfRange`] outside [`SaturationFormula::range_k`].
    pub fn saturation_vapour_pressure_hpa(self, phase: Phase, temperature_k: f64) -> Result<f64> {
        let t_k = check_temperature_k(temperature_k)?;
        let m = self.magnus(phase);
        let t_c = t_k - CELSIUS_ZERO_K;
        if !(t_c >= m.min_c && t_c <= m.max_c) {
            return Err(Error::AirTemperatureOutOfRange);
        }
        Ok(m.a_hpa * libm::exp(m.b * t_c / (m.c_c + t_c)))
    }

    /// Dew point (`Phase::Water`) or frost point (`Phase::Ice`), K: the temperature at which
    /// the pure-phase saturation pressure equals `vapour_pressure_hpa`. The inverse of the
    /// Magnus form, t = c L / (b - L), L = ln(e / a), exact to rounding.
    ///
    /// For moist air pass e / f(p) (as [`Air::dew_point_k`] does).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::VapourPressureOutOfRange`] when e <= 0 or the point
    /// lies outside [`SaturationFormula::range_k`].
    pub fn dew_point_k(self, phase: Phase, vapour_pressure_hpa: f64) -> Result<f64> {
        if !(finite(vapour_pressure_hpa)? > 0.0) {
            return Err(Error::VapourPressureOutOfRange);
        }
        let m = self.magnus(phase);
        let l = libm::log(vapour_pressure_hpa / m.a_hpa);
        let t_c = m.c_c * l / (m.b - l);
        if !(t_c >= m.min_c && t_c <= m.max_c) {
            return Err(Error::VapourPressureOutOfRange);
        }
        Ok(t_c + CELSIUS_ZERO_K)
    }
}

fn check_pressure_hpa(pressure_hpa: f64) -> Result<f64> {
    if finite(pressure_hpa)? >= AIR_PRESSURE_MIN_HPA && pressure_hpa <= AIR_PRESSURE_MAX_HPA {
        Ok(pressure_hpa)
    } else {
        Err(Error::AirPressureOutOfRange)
    }
}

/// Water-vapour density rho_v = 216.7 e / T in g m^-3 (e in hPa, T in K), the ideal-gas law
/// for water vapour (M_w = 18.015 g/mol); error from non-ideality below 0.5 % in air.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
/// [`Error::VapourPressureOutOfRange`] for a negative vapour pressure.
pub fn vapour_density_g_m3(vapour_pressure_hpa: f64, temperature_k: f64) -> Result<f64> {
    let t = check_temperature_k(temperature_k)?;
    if !(finite(vapour_pressure_hpa)? >= 0.0) {
        return Err(Error::VapourPressureOutOfRange);
    }
    Ok(VAPOUR_DENSITY_FACTOR * vapour_pressure_hpa / t)
}

/// Air of one temperature, relative humidity and pressure, uniform along a path.
///
/// Validated at construction, so every derived quantity is infallible.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Air {
    temperature_k: f64,
    relative_humidity: f64,
    pressure_hpa: f64,
    formula: SaturationFormula,
    saturation_hpa: f64,
    enhancement: f64,
}

impl Air {
    /// Air at `temperature_k` with relative humidity `relative_humidity` (a **fraction** in
    /// [0, 1], with respect to liquid water) and total pressure `pressure_hpa`, using the
    /// CIMO Magnus formula.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
    /// [`Error::AirTemperatureOutOfRange`] outside -45..+60 C,
    /// [`Error::RelativeHumidityOutOfRange`], [`Error::AirPressureOutOfRange`] outside
    /// [500, 1100] hPa.
    pub fn new(temperature_k: f64, relative_humidity: f64, pressure_hpa: f64) -> Result<Self> {
        Air::with_formula(
            temperature_k,
            relative_humidity,
            pressure_hpa,
            SaturationFormula::MagnusCimo,
        )
    }

    /// As [`Air::new`] with a chosen saturation formula (Buck 1981 covers -40..+50 C).
    ///
    /// # Errors
    /// As [`Air::new`].
    pub fn with_formula(
        temperature_k: f64,
        relative_humidity: f64,
        pressure_hpa: f64,
        formula: SaturationFormula,
    ) -> Result<Self> {
        if !(finite(relative_humidity)? >= 0.0 && relative_humidity <= 1.0) {
            return Err(Error::RelativeHumidityOutOfRange);
        }
        let saturation_hpa = formula.saturation_vapour_pressure_hpa(Phase::Water, temperature_k)?;
        let enhancement = formula.enhancement_factor(Phase::Water, pressure_hpa)?;
        Ok(Air {
            temperature_k,
            relative_humidity,
            pressure_hpa,
            formula,
            saturation_hpa,
            enhancement,
        })
    }

    /// Air temperature, K.
    #[must_use]
    pub fn temperature_k(&self) -> f64 {
        self.temperature_k
    }
    /// Relative humidity, a fraction in [0, 1] (with respect to liquid water).
    #[must_use]
    pub fn relative_humidity(&self) -> f64 {
        self.relative_humidity
    }
    /// Total air pressure, hPa.
    #[must_use]
    pub fn pressure_hpa(&self) -> f64 {
        self.pressure_hpa
    }
    /// The saturation formula in use.
    #[must_use]
    pub fn formula(&self) -> SaturationFormula {
        self.formula
    }
    /// Saturation vapour pressure of moist air over water, f(p) e_w(T), hPa.
    #[must_use]
    pub fn saturation_vapour_pressure_hpa(&self) -> f64 {
        self.enhancement * self.saturation_hpa
    }
    /// Partial pressure of water vapour e = U f(p) e_w(T), hPa.
    #[must_use]
    pub fn vapour_pressure_hpa(&self) -> f64 {
        self.relative_humidity * self.enhancement * self.saturation_hpa
    }
    /// Water-vapour density rho_v = 216.7 e / T, g m^-3.
    #[must_use]
    pub fn vapour_density_g_m3(&self) -> f64 {
        VAPOUR_DENSITY_FACTOR * self.vapour_pressure_hpa() / self.temperature_k
    }

    /// Dew point, K: the temperature at which this air (same pressure and vapour content)
    /// would be saturated over water, e_w(T_d) = e / f(p) = U e_w(T).
    ///
    /// # Errors
    /// [`Error::VapourPressureOutOfRange`] for dry air (U = 0) or a dew point below the
    /// formula's range.
    pub fn dew_point_k(&self) -> Result<f64> {
        self.formula
            .dew_point_k(Phase::Water, self.relative_humidity * self.saturation_hpa)
    }

    /// Precipitable water of a horizontal path of `distance_m`, in g cm^-2 (numerically the
    /// depth of liquid water in cm): w = rho_v (g m^-3) * d (m) * 1e-4 (m^2/cm^2).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::DistanceNegative`].
    pub fn precipitable_water_g_cm2(&self, distance_m: f64) -> Result<f64> {
        if !(finite(distance_m)? >= 0.0) {
            return Err(Error::DistanceNegative);
        }
        Ok(self.vapour_density_g_m3() * distance_m * 1.0e-4)
    }

    /// Precipitable water of a horizontal path of `distance_m`, mm of liquid water:
    /// 10 times [`Air::precipitable_water_g_cm2`].
    ///
    /// # Errors
    /// As [`Air::precipitable_water_g_cm2`].
    pub fn precipitable_water_mm(&self, distance_m: f64) -> Result<f64> {
        Ok(10.0 * self.precipitable_water_g_cm2(distance_m)?)
    }
}
