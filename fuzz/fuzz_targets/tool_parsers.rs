//! Arbitrary bytes through every parser of the host tool (`tapline::tool::input`, feature `cli`): the spec
//! TOML reader, the text/CSV table reader and the tap-table reader in every format and
//! notation. Each must return a value or a one-line error — never panic, never a multi-line
//! message.
#![no_main]

use libfuzzer_sys::fuzz_target;
use std::path::PathBuf;
use tapline::tool::failure;
use tapline::tool::input::{spec, table, taps};

fn one_line<T>(result: Result<T, failure::Failure>) {
    if let Err(e) = result {
        let text = e.to_string();
        assert!(!text.contains('\n'), "multi-line error: {text:?}");
    }
}

fuzz_target!(|data: &[u8]| {
    let path: PathBuf =
        std::env::temp_dir().join(format!("tapline-fuzz-{}.txt", std::process::id()));
    if std::fs::write(&path, data).is_err() {
        return;
    }
    one_line(spec::SpecArgs::from_file(&path));
    one_line(table::read_rows(&path));
    for format in [taps::Format::Q15, taps::Format::Q31, taps::Format::F32] {
        for written in [taps::Written::Codes, taps::Written::Real] {
            one_line(taps::read(&path, format, written));
        }
    }
});
