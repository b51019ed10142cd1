//! The split engine: for a situation, every passer's metrics against the
//! league in the same spots, with a state-mix adjusted baseline,
//! empirical-Bayes estimates and intervals, percentiles, z-scores and
//! season-to-season stability; the passer profile; the snaps behind a number.
//! Pages, JSON, CSV and the PDF report are all views of these values.

mod index;
pub mod metrics;
pub mod review;
mod profile;
#[cfg(test)]
mod reference;
mod scan;
mod shrink;
mod snaps;
mod table;
mod tags;

pub use metrics::{metric_group, metric_index, MetricDef, SnapValues, Stat, Unit, METRICS, METRIC_GROUPS};
pub use snaps::{coach_spot, down_distance, game_snaps, play_indices, play_list, quarter, result_text, snap_at, Snap};
pub use index::SplitIndex;
pub use profile::{epa_distribution, epa_distribution_in, profile, profile_in, profile_with, EpaDistribution, Profile, ProfileLine, SeasonLine};
pub use table::{split_table, split_table_for, split_table_in, Cell, MetricInfo, PasserRow, SortBy, SplitTable, DEFAULT_MIN_DROPBACKS};
pub use tags::{tag_breakdown, tag_breakdown_in, TagBreakdown, TagBreakdownError, TagLine};
