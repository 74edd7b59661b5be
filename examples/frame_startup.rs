//! Start-up cost of a frame converter, for instruction counting with callgrind: the 1 mK
//! table for an 8-14 um energy band over 250-1200 K, the work a camera does at power-on.
//! Three ways to start (the argument), each measured against the program run without one:
//!
//! - `rows_and_new`: `FrameTable::required_rows`, then `FrameConverter::new` (what a C
//!   caller does with `bt_frame_table_rows_band` + `bt_frame_converter_new_band`);
//! - `new`: `FrameConverter::new` alone into statically sized storage;
//! - `offline`: the state and rows built beforehand (here: before the measured part, in a
//!   real firmware on a host, kept in flash), re-wrapped with `FrameConverter::from_parts`
//!   (geometry check and fingerprint) and given the device's scene with `set_scene`.
//!
//! ```text
//! cargo build --release --example frame_startup
//! valgrind --tool=callgrind --callgrind-out-file=target/startup.out \
//!     target/release/examples/frame_startup new
//! ```
//! and subtract the count of the run with no argument (for `offline`, of the run with
//! `prepare`, which builds the parts but does not start from them). The scene and
//! calibration are invented.

use bandtemp::band::Band;
use bandtemp::frame::{CountsMap, FrameConverter, FrameTable, Rails, TableRow, TemperatureRange};
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;

fn main() -> Result<(), bandtemp::Error> {
    let mode = std::env::args().nth(1).unwrap_or_default();
    let band = Band::rectangular(8.0, 14.0, Detector::Energy)?;
    let scene = Scene::new(0.92, 293.15)?;
    let counts = CountsMap::linear(0.002, -2.0)?;
    let range = TemperatureRange::new(250.0, 1200.0)?;
    let mut storage: [TableRow; 256] = [[0.0; 4]; 256];
    let converter = match mode.as_str() {
        "rows_and_new" => {
            let rows = FrameTable::required_rows(&band, range, 1e-3)?;
            let storage = storage
                .get_mut(..rows)
                .ok_or(bandtemp::Error::FrameStorageTooSmall)?;
            FrameConverter::new(
                &band,
                &scene,
                counts,
                Rails::default(),
                range,
                1e-3,
                storage,
            )?
        }
        "new" => FrameConverter::new(
            &band,
            &scene,
            counts,
            Rails::default(),
            range,
            1e-3,
            &mut storage,
        )?,
        "prepare" | "offline" => {
            // Built "offline", with another scene than the device's.
            let factory = Scene::new(1.0, 296.0)?;
            let built = FrameConverter::new(
                &band,
                &factory,
                counts,
                Rails::default(),
                range,
                1e-3,
                &mut storage,
            )?;
            let state = std::hint::black_box(built.state());
            let rows: Vec<TableRow> = std::hint::black_box(built.table().rows().to_vec());
            if mode == "prepare" {
                return Ok(());
            }
            let mut device = FrameConverter::from_parts(state, &rows)?;
            device.set_scene(&band, &scene)?;
            let g = device.table().geometry();
            println!(
                "{} rows, max pixel error {:.4e} K",
                g.rows(),
                g.max_pixel_error_k()
            );
            return Ok(());
        }
        _ => return Ok(()),
    };
    let g = converter.table().geometry();
    println!(
        "{} rows, max pixel error {:.4e} K",
        g.rows(),
        g.max_pixel_error_k()
    );
    Ok(())
}
