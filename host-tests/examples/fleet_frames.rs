//! Writes a small invented fleet of report frames (three nodes, one damaged frame, trailing
//! garbage after one file) into a folder, for trying `covgate fleet`:
//!
//!     cargo run -q -p covgate-host --example fleet_frames -- frames/
//!     cargo run -q -p covgate-host --bin covgate -- fleet frames/

fn main() {
    let dir = std::env::args().nth(1).unwrap_or_else(|| "frames".into());
    let path = std::path::Path::new(&dir);
    match covgate_host::fleet_frames::write(path) {
        Ok(all) => eprintln!(
            "wrote node1.bin, node2.bin, node3.bin in {} ({} samples in undamaged frames)",
            path.display(),
            all.count()
        ),
        Err(e) => {
            eprintln!("cannot write {dir}: {e}");
            std::process::exit(1);
        }
    }
}
