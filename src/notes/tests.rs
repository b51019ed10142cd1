use super::*;
use std::sync::atomic::{AtomicUsize, Ordering};

fn scratch() -> PathBuf {
    static N: AtomicUsize = AtomicUsize::new(0);
    let dir = std::env::temp_dir().join(format!("lategame-notes-{}-{}", std::process::id(), N.fetch_add(1, Ordering::SeqCst)));
    let _ = std::fs::remove_dir_all(&dir);
    database_path(&dir)
}

fn key(game: &str, seq: i32) -> SnapKey {
    SnapKey { game: game.into(), seq }
}

#[test]
fn notes_round_trip_and_survive_reopening() {
    let path = scratch();
    let s = NoteStore::open(&path).unwrap();
    let a = s.add_note("fp1", &key("g1", 12), "late INT, <b>read</b> the safety").unwrap();
    let b = s.add_note("fp1", &key("g2", 3), "good ball").unwrap();
    assert_eq!(a.text, "late INT, <b>read</b> the safety", "stored as typed");
    assert!(b.id > a.id);
    assert_eq!(s.update_note(b.id, "very good ball").unwrap().unwrap().text, "very good ball");
    assert!(s.update_note(9999, "x").unwrap().is_none());
    drop(s);
    let s = NoteStore::open(&path).unwrap();
    let all = s.notes().unwrap();
    assert_eq!(all.len(), 2);
    assert_eq!(all[1].text, "very good ball");
    assert!(s.delete_note(a.id).unwrap());
    assert!(!s.delete_note(a.id).unwrap());
    assert_eq!(s.notes().unwrap().len(), 1);
}

#[test]
fn note_text_is_checked() {
    let s = NoteStore::open(&scratch()).unwrap();
    assert!(matches!(s.add_note("f", &key("g", 1), "   "), Err(NotesError::Invalid(_))));
    let long = "x".repeat(NOTE_MAX_CHARS + 1);
    let e = s.add_note("f", &key("g", 1), &long).unwrap_err().to_string();
    assert!(e.contains("1001 characters"), "{e}");
    // Exactly the limit is fine; characters, not bytes.
    assert!(s.add_note("f", &key("g", 1), &"é".repeat(NOTE_MAX_CHARS)).is_ok());
}

#[test]
fn lists_keep_order_refuse_duplicates_and_edit() {
    let s = NoteStore::open(&scratch()).unwrap();
    let l = s.create_cutup("fp", "Late-game INTs to review", &[key("g1", 5), key("g1", 2)]).unwrap();
    assert_eq!(l.snaps, vec![key("g1", 5), key("g1", 2)]);
    assert!(s.create_cutup("fp", "Late-game INTs to review", &[]).is_err(), "names are unique");
    let change = CutupChange { add: vec![key("g2", 9), key("g1", 5)], remove: vec![key("g1", 2)], ..Default::default() };
    let l2 = s.update_cutup(l.id, "fp", &change).unwrap().unwrap();
    assert_eq!(l2.snaps, vec![key("g1", 5), key("g2", 9)], "appended once, removed one, order kept");
    let renamed = s.update_cutup(l.id, "fp", &CutupChange { name: Some("Third-down misses".into()), ..Default::default() }).unwrap().unwrap();
    assert_eq!(renamed.name, "Third-down misses");
    assert_eq!(renamed.snaps, l2.snaps);
    assert!(s.update_cutup(777, "fp", &CutupChange::default()).unwrap().is_none());
    assert_eq!(s.cutups().unwrap().len(), 1);
    assert!(s.delete_cutup(l.id).unwrap());
    assert!(s.cutups().unwrap().is_empty());
}

#[test]
fn list_names_are_checked() {
    let s = NoteStore::open(&scratch()).unwrap();
    assert!(s.create_cutup("fp", "", &[]).is_err());
    assert!(s.create_cutup("fp", &"n".repeat(LIST_NAME_MAX_CHARS + 1), &[]).is_err());
}

#[test]
fn placing_counts_what_a_new_file_lacks() {
    use crate::models::testkit;
    let p = testkit::league(4, 1, 3);
    let g = &p.games[0];
    let here = key(&g.key, p.seq[g.start]);
    assert_eq!(locate(&p, &here), Some(g.start));
    let gone = key(&g.key, 99_999);
    let nogame = key("no-such-game", 1);
    let (placed, lost) = place(&p, vec![here.clone(), gone.clone(), nogame.clone()], |k| k.clone());
    assert_eq!(placed.len(), 1);
    assert_eq!(placed[0].1, g.start);
    assert_eq!(lost, 2);
    let e = check_snaps(&p, &[gone]).unwrap_err().to_string();
    assert!(e.contains("has no snap 99999"), "{e}");
    let e = check_snaps(&p, &[nogame]).unwrap_err().to_string();
    assert!(e.contains("no game no-such-game"), "{e}");
}
