//! Invented names for the demo league: its name, the 32 clubs (places and
//! nicknames built from syllables, three-letter codes taken from the places)
//! and the passer-name generator (ordinary first names, surnames built from
//! syllables no real player carries).

use super::draw::{int_in, SimRng};
use std::collections::HashSet;

/// The league's name.
pub const LEAGUE_NAME: &str = "Vardessa League";

/// Club `j`'s place is `PLACE_HEAD[j]` + `PLACE_TAIL[j % 8]`, its nickname
/// `NICK_HEAD[j]` + `NICK_TAIL[(3j + 1) % 8]`: syllables chosen so that no
/// place or nickname is a real one.
const PLACE_HEAD: [&str; 32] = [
    "Sevr", "Korv", "Isk", "Dulv", "Mezz", "Farr", "Lenv", "Quesk", "Ryv", "Sylk", "Bresk", "Aldr", "Nevk", "Cresk",
    "Wexl", "Hext", "Tesk", "Orb", "Gald", "Cael", "Pyv", "Myrn", "Gresk", "Ekkel", "Sorv", "Vyr", "Hevk", "Brenv",
    "Lysk", "Cyrv", "Tarv", "Ursk",
];
const PLACE_TAIL: [&str; 8] = ["ossa", "ennick", "avel", "ithen", "orrow", "anthe", "eyne", "ovar"];
const NICK_HEAD: [&str; 32] = [
    "Zemb", "Quorv", "Thess", "Vrel", "Skel", "Brov", "Dral", "Mirr", "Grell", "Yast", "Glim", "Porr", "Tresk", "Varn",
    "Hob", "Lusk", "Fenn", "Crov", "Sarr", "Tamm", "Gorm", "Jask", "Nell", "Rusk", "Zorr", "Murr", "Tarr", "Vess",
    "Brisk", "Cald", "Hesp", "Plov",
];
const NICK_TAIL: [&str; 8] = ["als", "ins", "aks", "ettes", "ords", "ikes", "ums", "ayers"];

/// Each club's three-letter code: three letters of its place, in order,
/// starting with the first. Picked by hand so that no code is a familiar
/// abbreviation. A week's games are numbered in the order of the visiting
/// clubs' codes.
const CODES: [&str; 32] = [
    "SEV", "KRV", "IKV", "DUV", "MRW", "FRH", "LVY", "QEK", "RYV", "SYK", "BEK", "ALD", "NVK", "CKN", "WXN", "HXV",
    "TEK", "OBK", "GDV", "CEH", "PYV", "MYN", "GKY", "EKV", "SOR", "VYR", "HEK", "BNV", "LYK", "CYV", "TYN", "UKV",
];

/// The 32 clubs as (code, place, nickname), in club order.
pub(crate) fn clubs() -> Vec<(&'static str, String, String)> {
    (0..CODES.len())
        .map(|j| {
            let place = format!("{}{}", PLACE_HEAD[j], PLACE_TAIL[j % PLACE_TAIL.len()]);
            let nickname = format!("{}{}", NICK_HEAD[j], NICK_TAIL[(3 * j + 1) % NICK_TAIL.len()]);
            (CODES[j], place, nickname)
        })
        .collect()
}

const FIRST: [&str; 60] = [
    "Tobin", "Marek", "Cale", "Dorian", "Ansel", "Bram", "Cyrus", "Dex", "Emmett", "Falk",
    "Gideon", "Hollis", "Idris", "Jory", "Kellan", "Lorne", "Milo", "Nash", "Orrin", "Pax",
    "Quill", "Rafe", "Soren", "Tiernan", "Ulric", "Vance", "Wendell", "Xander", "Yorick", "Zane",
    "Arlo", "Beck", "Corwin", "Dashiell", "Everett", "Fitz", "Garrick", "Heath", "Ivo", "Jasper",
    "Kit", "Leland", "Merritt", "Niles", "Osric", "Percival", "Reeve", "Silas", "Thane", "Ambrose",
    "Vaughn", "Wilder", "Bastian", "Caspian", "Dalton", "Eamon", "Flint", "Gray", "Harlan", "Lucan",
];

const SUR_HEAD: [&str; 24] = [
    "Vash", "Quel", "Dras", "Morv", "Trel", "Skand", "Brix", "Ulm", "Yarr", "Zel", "Orv", "Thal",
    "Grem", "Wrax", "Jast", "Pluv", "Krob", "Fald", "Ombr", "Hesk", "Iv", "Naz", "Cret", "Sov",
];

const SUR_TAIL: [&str; 18] = [
    "reck", "ovane", "quith", "adrel", "ennox", "imber", "usk", "ozny", "ekker", "arth",
    "ibble", "oruk", "yndle", "aszek", "ethorn", "ulvey", "issard", "omir",
];

/// Draws full names never handed out before in this league.
pub(crate) struct NameMaker {
    used: HashSet<String>,
}

impl NameMaker {
    pub(crate) fn new() -> NameMaker {
        NameMaker { used: HashSet::new() }
    }

    pub(crate) fn next(&mut self, rng: &mut SimRng) -> String {
        for attempt in 0u32.. {
            let f = FIRST[int_in(rng, 0, FIRST.len() as i32 - 1) as usize];
            let h = SUR_HEAD[int_in(rng, 0, SUR_HEAD.len() as i32 - 1) as usize];
            let t = SUR_TAIL[int_in(rng, 0, SUR_TAIL.len() as i32 - 1) as usize];
            let mut name = format!("{f} {h}{t}");
            if attempt > 200 {
                // 26k combinations; only a very long league gets here.
                name = format!("{name} {}", roman(2 + attempt % 4));
            }
            if self.used.insert(name.clone()) {
                return name;
            }
        }
        unreachable!("u32 attempts exhausted")
    }
}

fn roman(n: u32) -> &'static str {
    match n {
        2 => "II",
        3 => "III",
        4 => "IV",
        _ => "V",
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn clubs_are_distinct_and_codes_come_from_places() {
        let clubs = clubs();
        assert_eq!(clubs.len(), 32);
        let codes: HashSet<&str> = clubs.iter().map(|c| c.0).collect();
        let places: HashSet<&str> = clubs.iter().map(|c| c.1.as_str()).collect();
        let nicknames: HashSet<&str> = clubs.iter().map(|c| c.2.as_str()).collect();
        assert_eq!((codes.len(), places.len(), nicknames.len()), (32, 32, 32));
        for (code, place, _) in &clubs {
            assert!(code.len() == 3 && code.chars().all(|c| c.is_ascii_uppercase()), "{code}");
            assert!(place.starts_with(&code[..1]), "{code} {place}");
            // the code's letters appear in the place in order
            let mut rest = place.to_ascii_uppercase();
            for c in code.chars() {
                let at = rest.find(c).unwrap_or_else(|| panic!("{code} is not spelt from {place}"));
                rest = rest[at + 1..].to_string();
            }
        }
    }
}
