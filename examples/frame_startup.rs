//! Start-up cost of a frame converter, for instruction counting with callgrind:
//! the 1 mK table for an 8-14 um energy band over 250-1200 K (rows asked, then the
//! converter built), the work a camera does once at power-on.
//!
//! ```text
//! cargo build --release --example frame_startup
//! valgrind --tool=callgrind --callgrind-out-file=target/startup.out \
//!     target/release/examples/frame_startup build
//! valgrind --tool=callgrind --callgrind-out-file=target/baseline.out \
//!     target/release/examples/frame_startup
//! ```
//! The difference of the two totals is the start-up's instruction count. The scene and
//! calibration are invented.

use bandtemp::band::Band;
use bandtemp::frame::{CountsMap, FrameConverter, FrameTable, Rails, TableRow, TemperatureRange};
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;

fn main() -> Result<(), bandtemp::Error> {
    let build = std::env::args().nth(1).as_deref() == Some("build");
    let band = Band::rectangular(8.0, 14.0, Detector::Energy)?;
    let scene = Scene::new(0.92, 293.15)?;
    let counts = CountsMap::linear(0.002, -2.0)?;
    let range = TemperatureRange::new(250.0, 1200.0)?;
    let mut storage = [[0.0f32; 4]; 256];
    if build {
        let rows = FrameTable::required_rows(&band, range, 1e-3)?;
        let converter = FrameConverter::new(
            &band,
            &scene,
            counts,
            Rails::default(),
            range,
            1e-3,
            &mut storage[..rows],
        )?;
        let g = converter.table().geometry();
        println!(
            "{} rows, max pixel error {:.4e} K",
            g.rows(),
            g.max_pixel_error_k()
        );
    }
    let _: &[TableRow] = &storage;
    Ok(())
}
