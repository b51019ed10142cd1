//! What Linux says about this process in `/proc/self/stat`, for the timing
//! examples (`#[path = "support/proc_stat.rs"] mod proc_stat;`): CPU seconds
//! and minor page faults so far. NaN where the file cannot be read.
#![allow(dead_code)]

/// The fields after the command name (which may hold spaces, in
/// parentheses): field 3 of the line is number 0 here.
fn fields() -> Vec<String> {
    let Ok(stat) = std::fs::read_to_string("/proc/self/stat") else { return Vec::new() };
    let Some((_, rest)) = stat.rsplit_once(')') else { return Vec::new() };
    rest.split_whitespace().map(str::to_string).collect()
}

fn field(f: &[String], k: usize) -> f64 {
    f.get(k).and_then(|v| v.parse::<f64>().ok()).unwrap_or(f64::NAN)
}

/// CPU seconds (user + system) this process has used so far: fields 14
/// and 15 of the line, in clock ticks of 1/100 s on Linux.
pub fn cpu_seconds() -> f64 {
    let f = fields();
    (field(&f, 11) + field(&f, 12)) / 100.0
}

/// Minor page faults of this process so far (field 10 of the line).
pub fn minor_faults() -> f64 {
    field(&fields(), 7)
}
