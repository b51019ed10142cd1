//! Invented names for the demo league: the 32 clubs (made-up places and
//! nicknames, three-letter codes) and the passer-name generator (ordinary
//! first names, surnames built from syllables no real player carries).

use super::draw::{int_in, SimRng};
use std::collections::HashSet;

/// (code, place, nickname). Every place is invented.
pub(crate) const CLUBS: [(&str, &str, &str); 32] = [
    ("SLM", "Saltmarsh", "Herons"),
    ("KBY", "Kestrel Bay", "Gulls"),
    ("IRF", "Ironford", "Foundrymen"),
    ("DSK", "Duskwater", "Lanterns"),
    ("MRP", "Marrow Point", "Wreckers"),
    ("FNH", "Fenwick Hollow", "Owls"),
    ("LKV", "Larkspur Vale", "Stags"),
    ("QRF", "Quarry Flats", "Masons"),
    ("RDH", "Redfern Harbor", "Pilots"),
    ("SVP", "Silverpine", "Lumberjacks"),
    ("BRF", "Brindle Falls", "Millers"),
    ("ASH", "Ashcombe", "Wardens"),
    ("NGL", "Northgale", "Comets"),
    ("CPH", "Copperhill", "Prospectors"),
    ("WDX", "Windle Cross", "Drovers"),
    ("HRM", "Harrow Mere", "Anglers"),
    ("TMR", "Tamsin Ridge", "Harriers"),
    ("OKR", "Oakreach", "Crofters"),
    ("GLM", "Glimmerton", "Tinkers"),
    ("CDL", "Cinder Lake", "Otters"),
    ("PAV", "Port Averly", "Ferrymen"),
    ("MSG", "Mossgrave", "Badgers"),
    ("GWK", "Greywick", "Sentinels"),
    ("EMJ", "Emberly Junction", "Stokers"),
    ("STM", "Stonemere", "Quarrymen"),
    ("VLC", "Veldt Crossing", "Marauders"),
    ("HLS", "Halloway Sound", "Cormorants"),
    ("BRW", "Bramblewood", "Thunderheads"),
    ("LNT", "Lanternfield", "Beacons"),
    ("CRW", "Crowhollow", "Ridgebacks"),
    ("TWN", "Twinmoor", "Tanners"),
    ("ULV", "Ulverby", "Glassblowers"),
];

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
