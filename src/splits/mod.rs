//! The split engine: for a situation, every passer's metrics against the
//! league in the same spots, with a state-mix adjusted baseline,
//! two-level estimates centred on each passer's own level, lift (his value
//! here minus his normal) with intervals, percentiles, the chance of beating the
//! league and season-to-season stability; the passer profile; the snaps behind a number.
//! Pages, JSON, CSV and the PDF report are all views of these values.

mod cell;
mod estimates;
mod index;
mod memo;
pub mod metrics;
pub mod review;
mod lift;
mod normal;
mod opponent;
mod plan;
mod profile;
#[cfg(test)]
mod profile_tests;
#[cfg(test)]
mod reference;
mod scan;
mod shrink;
mod snaps;
mod stages;
mod table;
mod tags;
mod words;

pub use metrics::{headings, is_style, metric_group, metric_index, MetricDef, SnapValues, Stat, Unit, METRICS, METRIC_GROUPS};
pub use stages::stage_times;
pub use snaps::{coach_spot, down_distance, game_snaps, play_indices, play_list, quarter, result_text, snap_at, Snap};
pub use index::SplitIndex;
pub use opponent::{fit_metric as opponent_fit_metric, opponent_fit, Adjusted, OpponentFit, ADJUSTED_METRIC, OPPONENT_WORDS};
pub use profile::{epa_distribution, epa_distribution_in, profile, profile_in, EpaDistribution, Profile, ProfileLine, SeasonLine};
pub use table::{default_min_dropbacks, split_table, split_table_for, split_table_in, split_row_in, Cell, MetricInfo, PasserRow, SortBy, SplitRow, SplitTable, DEFAULT_MIN_DROPBACKS, DEFAULT_MIN_VS_ONE_DEFENSE};
pub use tags::{tag_breakdown, tag_breakdown_in, TagBreakdown, TagBreakdownError, TagLine};
pub use words::{lift_above_zero, lift_words, stability_words, LIFT_RULE};
