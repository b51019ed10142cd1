//! Linear scales and "nice" tick values (Heckbert, "Nice numbers for graph
//! labels", Graphics Gems, 1990).

/// Maps a data interval onto a pixel interval.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Scale {
    pub d0: f64,
    pub d1: f64,
    pub r0: f64,
    pub r1: f64,
}

impl Scale {
    pub fn new(domain: (f64, f64), range: (f64, f64)) -> Scale {
        let (mut d0, mut d1) = domain;
        if !d0.is_finite() || !d1.is_finite() {
            d0 = 0.0;
            d1 = 1.0;
        }
        if d0 == d1 {
            d0 -= 0.5;
            d1 += 0.5;
        }
        Scale { d0, d1, r0: range.0, r1: range.1 }
    }
    pub fn at(&self, v: f64) -> f64 {
        let t = (v - self.d0) / (self.d1 - self.d0);
        self.r0 + t.clamp(-0.05, 1.05) * (self.r1 - self.r0)
    }
    /// Widen the domain to the outer nice ticks.
    pub fn nice(self, count: usize) -> Scale {
        let t = nice_ticks(self.d0, self.d1, count);
        match (t.first(), t.last()) {
            (Some(&a), Some(&b)) if a < b => Scale { d0: a.min(self.d0), d1: b.max(self.d1), ..self },
            _ => self,
        }
    }
    /// Round ticks inside the domain. Loose labelling of a domain already
    /// widened by `nice` can step past both ends (those ticks would be
    /// pinned to the edge under the wrong label), so they are dropped, and
    /// a finer count is tried when fewer than three remain.
    pub fn ticks(&self, count: usize) -> Vec<f64> {
        let (lo, hi) = (self.d0.min(self.d1), self.d0.max(self.d1));
        let eps = (hi - lo).abs() * 1e-9;
        let inside = |c: usize| -> Vec<f64> { nice_ticks(self.d0, self.d1, c).into_iter().filter(|t| *t >= lo - eps && *t <= hi + eps).collect() };
        let mut best = inside(count);
        for c in count + 1..=count * 2 {
            if best.len() >= 3 {
                break;
            }
            let more = inside(c);
            if more.len() > best.len() {
                best = more;
            }
        }
        best
    }
}

fn nice_num(x: f64, round: bool) -> f64 {
    let e = x.log10().floor();
    let f = x / 10f64.powf(e);
    let nf = if round {
        if f < 1.5 {
            1.0
        } else if f < 3.0 {
            2.0
        } else if f < 7.0 {
            5.0
        } else {
            10.0
        }
    } else if f <= 1.0 {
        1.0
    } else if f <= 2.0 {
        2.0
    } else if f <= 5.0 {
        5.0
    } else {
        10.0
    };
    nf * 10f64.powf(e)
}

/// About `count` round tick values covering [lo, hi] (loose labelling).
pub fn nice_ticks(lo: f64, hi: f64, count: usize) -> Vec<f64> {
    if !lo.is_finite() || !hi.is_finite() || count < 2 {
        return Vec::new();
    }
    let (lo, hi) = if lo == hi { (lo - 0.5, hi + 0.5) } else { (lo.min(hi), lo.max(hi)) };
    let range = nice_num(hi - lo, false);
    let step = nice_num(range / (count as f64 - 1.0), true);
    let start = (lo / step).floor() * step;
    let end = (hi / step).ceil() * step;
    let mut out = Vec::new();
    let mut k = 0;
    loop {
        let v = start + k as f64 * step;
        if v > end + step * 0.5 || k > 100 {
            break;
        }
        // Clean floating noise such as 0.6000000000000001.
        let digits = (-step.log10().floor()).max(0.0) as i32 + 1;
        let p = 10f64.powi(digits);
        out.push((v * p).round() / p);
        k += 1;
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn heckbert_worked_example() {
        // source: Heckbert, "Nice numbers for graph labels", Graphics Gems (1990):
        // the range 105..543 with about 5 ticks labels 100, 200, ..., 600.
        assert_eq!(nice_ticks(105.0, 543.0, 5), vec![100.0, 200.0, 300.0, 400.0, 500.0, 600.0]);
    }

    #[test]
    fn ticks_cover_probabilities() {
        // common practice, no source
        assert_eq!(nice_ticks(0.0, 1.0, 6), vec![0.0, 0.2, 0.4, 0.6, 0.8, 1.0]);
        let t = nice_ticks(-0.37, 0.52, 5);
        assert!(t.first().unwrap() <= &-0.37 && t.last().unwrap() >= &0.52);
    }

    #[test]
    fn ticks_stay_inside_a_widened_domain() {
        // -0.08..0.35 widens to -0.2..0.4, whose own loose ticks would be
        // -0.5, 0, 0.5; only ticks inside are kept, at a finer step.
        let s = Scale::new((-0.08, 0.35), (0.0, 100.0)).nice(4);
        assert_eq!((s.d0, s.d1), (-0.2, 0.4));
        let t = s.ticks(4);
        assert!(t.len() >= 3, "{t:?}");
        assert!(t.iter().all(|v| *v >= s.d0 && *v <= s.d1), "{t:?}");
        let s = Scale::new((0.19, 0.61), (0.0, 100.0)).nice(5);
        assert!(s.ticks(5).iter().all(|v| *v >= s.d0 && *v <= s.d1));
    }

    #[test]
    fn scale_maps_ends() {
        let s = Scale::new((0.0, 10.0), (100.0, 200.0));
        assert_eq!(s.at(0.0), 100.0);
        assert_eq!(s.at(10.0), 200.0);
        assert_eq!(s.at(5.0), 150.0);
        let flat = Scale::new((3.0, 3.0), (0.0, 10.0));
        assert!(flat.at(3.0).is_finite());
    }
}
