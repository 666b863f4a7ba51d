//! Writes the demo captures into `fixtures/demo/` from their seeded generators
//! (`covgate_host::demo`). Regenerate with
//!
//!     cargo run -p covgate-host --example demo_captures

fn main() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("..")
        .join("fixtures")
        .join("demo");
    for s in covgate_host::demo::all() {
        let p = dir.join(format!("{}.csv", s.name));
        std::fs::write(&p, &s.csv).expect("write the capture");
        println!("{}", p.display());
    }
}
