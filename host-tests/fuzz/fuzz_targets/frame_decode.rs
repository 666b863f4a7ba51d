//! Report frame decoding of arbitrary bytes: never panics; whatever decodes re-encodes to
//! the same 64 bytes.
#![no_main]

use covgate::ReportFrame2;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if let Ok(f) = ReportFrame2::decode(data) {
        let mut out = [0u8; 64];
        let n = f.encode(&mut out).expect("a decoded frame encodes");
        assert_eq!(&out[..n], &data[..n], "decode/encode must round-trip");
    }
});
