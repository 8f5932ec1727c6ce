//! The committed C header (`include/flashduty.h`) is the one cbindgen generates from the
//! crate; `FLASHDUTY_WRITE_HEADER=1 cargo test -p flashduty-c` rewrites it.

#[test]
fn header_is_current() {
    let dir = env!("CARGO_MANIFEST_DIR");
    let config = cbindgen::Config::from_file(format!("{dir}/cbindgen.toml")).expect("cbindgen.toml");
    let bindings = cbindgen::Builder::new()
        .with_crate(dir)
        .with_config(config)
        .generate()
        .expect("cbindgen generates the header");
    let mut generated = Vec::new();
    bindings.write(&mut generated);
    let generated = String::from_utf8(generated).expect("UTF-8");
    let path = format!("{dir}/include/flashduty.h");
    if std::env::var_os("FLASHDUTY_WRITE_HEADER").is_some() {
        std::fs::write(&path, &generated).expect("write the header");
        return;
    }
    let committed = std::fs::read_to_string(&path).unwrap_or_default();
    assert!(
        committed == generated,
        "include/flashduty.h is out of date: run FLASHDUTY_WRITE_HEADER=1 cargo test -p flashduty-c"
    );
}
