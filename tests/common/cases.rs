//! How many cases each proptest property runs.

use proptest::test_runner::Config;

/// At least 256 cases per property (`PROPTEST_CASES` raises it, never lowers it) — except
/// under Miri, which interprets every instruction: there `PROPTEST_CASES` is taken as given
/// (default 4), so CI can sweep the ring and kernel tests for undefined behaviour in minutes.
pub fn config() -> Config {
    let asked: Option<u32> = std::env::var("PROPTEST_CASES")
        .ok()
        .and_then(|v| v.parse().ok());
    let cases = if cfg!(miri) {
        asked.unwrap_or(4)
    } else {
        asked.unwrap_or(256).max(256)
    };
    Config {
        cases,
        // Under Miri the regression file cannot be read (isolation); elsewhere it is kept.
        failure_persistence: if cfg!(miri) {
            None
        } else {
            Config::default().failure_persistence
        },
        ..Config::default()
    }
}
