//! Tells the library whether the target core has the Armv7E-M DSP extension (dual 16-bit
//! multiply-accumulate). Stable Rust does not expose Arm target features to `cfg`, so the
//! target triple decides: `thumbv7em-*` (Cortex-M4, M7) has it; `thumbv6m`/`thumbv7m` do not;
//! `thumbv7em-none-eabihf` also has the single-precision FPU.
fn main() {
    println!("cargo::rustc-check-cfg=cfg(tapline_arm_dsp)");
    println!("cargo::rustc-check-cfg=cfg(tapline_arm_fpu)");
    println!("cargo::rustc-check-cfg=cfg(tapline_armv6m)");
    println!("cargo::rerun-if-changed=build.rs");
    let target = std::env::var("TARGET").unwrap_or_default();
    if target.starts_with("thumbv7em-") {
        println!("cargo::rustc-cfg=tapline_arm_dsp");
    }
    // Armv6-M (Cortex-M0/M0+/M1): 16-bit Thumb, no multiply-accumulate, no unaligned loads.
    if target.starts_with("thumbv6m-") {
        println!("cargo::rustc-cfg=tapline_armv6m");
    }
    // The hard-float triple: single-precision FPU registers (Cortex-M4F, M7).
    if target == "thumbv7em-none-eabihf" {
        println!("cargo::rustc-cfg=tapline_arm_fpu");
    }
}
