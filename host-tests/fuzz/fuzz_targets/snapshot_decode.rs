//! Snapshot decoding of arbitrary bytes: never panics; whatever decodes re-encodes to the
//! same bytes.
#![no_main]

use covgate::Monitor;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if let Ok(m) = Monitor::<f32, 2>::decode_snapshot(data) {
        let mut out = [0u8; 256];
        let n = m.encode_snapshot(&mut out).expect("a decoded snapshot encodes");
        assert_eq!(&out[..n], data, "decode/encode must round-trip");
    }
    let _ = Monitor::<f32, 3>::decode_snapshot(data);
});
