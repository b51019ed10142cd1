//! A switch for test leagues: spread the clubs' pass defense and pass rush
//! wider than the demo league's, so which defenses a passer happened to face
//! moves his numbers more (the opponent adjustment's test league).

use super::league::TeamStrength;

/// Multiplies every club's `pass_def` and `pass_rush` by `scale` in each
/// game (after they are drawn, so the rest of the league is drawn as
/// without it). 1 (the default) leaves the league as it is: the bundled
/// demo league is drawn with 1.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DefenseSpread {
    pub scale: f64,
}

impl Default for DefenseSpread {
    fn default() -> DefenseSpread {
        DefenseSpread { scale: 1.0 }
    }
}

impl DefenseSpread {
    /// `s` with its pass defense and pass rush scaled.
    pub(crate) fn apply(&self, s: TeamStrength) -> TeamStrength {
        if self.scale == 1.0 {
            return s;
        }
        TeamStrength { pass_def: s.pass_def * self.scale, pass_rush: s.pass_rush * self.scale, ..s }
    }
}
