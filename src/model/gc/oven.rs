//! Oven programs and column geometry.

use serde::Serialize;

use super::GcError;

/// A linear oven program: initial temperature and hold, one ramp, final temperature and hold.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct OvenProgram {
    initial_c: f64,
    initial_hold_min: f64,
    ramp_c_per_min: f64,
    final_c: f64,
    final_hold_min: f64,
}

pub(super) fn check(
    field: &'static str,
    value: f64,
    low: f64,
    high: f64,
    reason: &'static str,
) -> Result<f64, GcError> {
    if value.is_finite() && value >= low && value <= high {
        Ok(value)
    } else {
        Err(GcError::BadCondition {
            field,
            value,
            reason,
        })
    }
}

impl OvenProgram {
    /// Parses `INITIAL_C:HOLD_MIN,RAMP_C_PER_MIN:FINAL_C:HOLD_MIN` (°C, min, °C/min), e.g.
    /// `40:2,10:250:5`: 40 °C held 2 min, 10 °C/min to 250 °C, held 5 min. `INITIAL_C:HOLD_MIN`
    /// alone is an isothermal run. Whitespace around numbers is ignored. The syntax is this
    /// project's own.
    ///
    /// # Errors
    /// [`GcError::BadOvenSpec`] naming the part that is not a number or has the wrong number of
    /// fields; [`GcError::BadCondition`] for values outside [`OvenProgram::new`]'s ranges.
    ///
    /// # Examples
    /// ```
    /// use phasewise::model::gc::OvenProgram;
    /// let p = OvenProgram::parse("40:2,10:250:5").unwrap();
    /// assert_eq!((p.initial_c(), p.final_c(), p.total_time_min()), (40.0, 250.0, 28.0));
    /// assert!(OvenProgram::parse("40:2,10:x:5").unwrap_err().to_string().contains("`x`"));
    /// ```
    pub fn parse(spec: &str) -> Result<Self, GcError> {
        let bad = |token: &str, reason: &str| GcError::BadOvenSpec {
            spec: spec.to_string(),
            token: token.to_string(),
            reason: reason.to_string(),
        };
        let numbers = |part: &str, want: usize| -> Result<Vec<f64>, GcError> {
            let fields: Vec<&str> = part.split(':').map(str::trim).collect();
            if fields.len() != want {
                return Err(bad(
                    part.trim(),
                    &format!("has {} field(s), expected {want}", fields.len()),
                ));
            }
            fields
                .iter()
                .map(|f| {
                    f.parse::<f64>()
                        .ok()
                        .filter(|v| v.is_finite())
                        .ok_or_else(|| bad(f, "is not a number"))
                })
                .collect()
        };
        let parts: Vec<&str> = spec.split(',').collect();
        match parts.as_slice() {
            [start] => {
                let a = numbers(start, 2)?;
                Self::new(a[0], a[1], 0.0, a[0], 0.0)
            }
            [start, ramp] => {
                let a = numbers(start, 2)?;
                let b = numbers(ramp, 3)?;
                Self::new(a[0], a[1], b[0], b[1], b[2])
            }
            _ => Err(bad(
                spec.trim(),
                "has more than one ramp (one ramp is supported)",
            )),
        }
    }

    /// The program in [`OvenProgram::parse`]'s syntax.
    pub fn to_spec(&self) -> String {
        if self.final_c > self.initial_c {
            format!(
                "{}:{},{}:{}:{}",
                self.initial_c,
                self.initial_hold_min,
                self.ramp_c_per_min,
                self.final_c,
                self.final_hold_min
            )
        } else {
            format!(
                "{}:{}",
                self.initial_c,
                self.initial_hold_min + self.final_hold_min
            )
        }
    }

    /// Builds a program; `final_c == initial_c` is an isothermal run (the ramp is then ignored).
    ///
    /// # Errors
    /// [`GcError::BadCondition`] naming the field: temperatures -100 to 450 C, holds 0 to 600 min,
    /// ramp above 0 and at most 100 C/min, final not below initial.
    pub fn new(
        initial_c: f64,
        initial_hold_min: f64,
        ramp_c_per_min: f64,
        final_c: f64,
        final_hold_min: f64,
    ) -> Result<Self, GcError> {
        check(
            "initial_c",
            initial_c,
            -100.0,
            450.0,
            "must be between -100 and 450 C",
        )?;
        check(
            "final_c",
            final_c,
            initial_c,
            450.0,
            "must be at least initial_c and at most 450 C",
        )?;
        check(
            "initial_hold_min",
            initial_hold_min,
            0.0,
            600.0,
            "must be between 0 and 600 min",
        )?;
        check(
            "final_hold_min",
            final_hold_min,
            0.0,
            600.0,
            "must be between 0 and 600 min",
        )?;
        if final_c > initial_c {
            check(
                "ramp_c_per_min",
                ramp_c_per_min,
                1e-3,
                100.0,
                "must be above 0 and at most 100 C/min",
            )?;
        }
        if initial_hold_min + final_hold_min <= 0.0 && final_c <= initial_c {
            return Err(GcError::BadCondition {
                field: "final_hold_min",
                value: final_hold_min,
                reason: "an isothermal program needs a hold time above 0",
            });
        }
        // An isothermal run is one hold (`to_spec` writes it so): the 600 min limit applies to
        // the sum, or a program would be accepted that its own text form could not express
        // (found by the `oven_program` fuzz target: `248:511,0:248:95`).
        if final_c <= initial_c && initial_hold_min + final_hold_min > 600.0 {
            return Err(GcError::BadCondition {
                field: "final_hold_min",
                value: initial_hold_min + final_hold_min,
                reason: "an isothermal program (final = initial temperature) is one hold: the holds together must be at most 600 min",
            });
        }
        Ok(Self {
            initial_c,
            initial_hold_min,
            ramp_c_per_min,
            final_c,
            final_hold_min,
        })
    }
    /// Initial temperature.
    pub fn initial_c(&self) -> f64 {
        self.initial_c
    }
    /// Initial hold.
    pub fn initial_hold_min(&self) -> f64 {
        self.initial_hold_min
    }
    /// Ramp rate.
    pub fn ramp_c_per_min(&self) -> f64 {
        self.ramp_c_per_min
    }
    /// Final temperature.
    pub fn final_c(&self) -> f64 {
        self.final_c
    }
    /// Final hold.
    pub fn final_hold_min(&self) -> f64 {
        self.final_hold_min
    }
    /// Duration of the ramp.
    pub fn ramp_time_min(&self) -> f64 {
        if self.final_c > self.initial_c {
            (self.final_c - self.initial_c) / self.ramp_c_per_min
        } else {
            0.0
        }
    }
    /// Total run time.
    pub fn total_time_min(&self) -> f64 {
        self.initial_hold_min + self.ramp_time_min() + self.final_hold_min
    }
    /// Oven temperature at `time_min` after injection (clamped to the program).
    pub fn temperature_c_at(&self, time_min: f64) -> f64 {
        let ramp_start = self.initial_hold_min;
        if time_min <= ramp_start {
            self.initial_c
        } else if time_min >= ramp_start + self.ramp_time_min() {
            self.final_c
        } else {
            self.initial_c + self.ramp_c_per_min * (time_min - ramp_start)
        }
    }
}

/// Column geometry and carrier-gas velocity.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct GcColumn {
    length_m: f64,
    inner_diameter_mm: f64,
    film_um: f64,
    linear_velocity_cm_s: f64,
}

impl GcColumn {
    /// Builds a column description.
    ///
    /// # Errors
    /// [`GcError::BadCondition`] naming the field: length 1-200 m, inner diameter 0.05-0.75 mm,
    /// film 0.05-50 um, average linear velocity 5-150 cm/s.
    pub fn new(
        length_m: f64,
        inner_diameter_mm: f64,
        film_um: f64,
        linear_velocity_cm_s: f64,
    ) -> Result<Self, GcError> {
        Ok(Self {
            length_m: check(
                "length_m",
                length_m,
                1.0,
                200.0,
                "must be between 1 and 200 m",
            )?,
            inner_diameter_mm: check(
                "inner_diameter_mm",
                inner_diameter_mm,
                0.05,
                0.75,
                "must be between 0.05 and 0.75 mm",
            )?,
            film_um: check(
                "film_um",
                film_um,
                0.05,
                50.0,
                "must be between 0.05 and 50 um",
            )?,
            linear_velocity_cm_s: check(
                "linear_velocity_cm_s",
                linear_velocity_cm_s,
                5.0,
                150.0,
                "must be between 5 and 150 cm/s",
            )?,
        })
    }
    /// Column length.
    pub fn length_m(&self) -> f64 {
        self.length_m
    }
    /// Inner diameter.
    pub fn inner_diameter_mm(&self) -> f64 {
        self.inner_diameter_mm
    }
    /// Film thickness.
    pub fn film_um(&self) -> f64 {
        self.film_um
    }
    /// Average carrier linear velocity.
    pub fn linear_velocity_cm_s(&self) -> f64 {
        self.linear_velocity_cm_s
    }
    /// Phase ratio beta = d_c / (4 d_f) (open-tubular column, thin film).
    pub fn phase_ratio(&self) -> f64 {
        self.inner_diameter_mm * 1000.0 / (4.0 * self.film_um)
    }
    /// Hold-up (dead) time t_M = L / u, treating the average velocity as constant during the run
    /// (a constant-flow approximation).
    pub fn holdup_time_min(&self) -> f64 {
        self.length_m * 100.0 / self.linear_velocity_cm_s / 60.0
    }
}
