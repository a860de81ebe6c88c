//! Print V(r) of a curve file at n uniform points from lo to hi (bohr; energies in hartree),
//! one value per line: what benches/peer_dvr.py needs to diagonalise the same curve.
//! Run: cargo run --release --example sample_curve -- curves/h2_born_oppenheimer.toml 0.2 30 400

use rungs::reader::{read_curve_file, PairOverride};
use std::path::Path;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let args: Vec<String> = std::env::args().collect();
    if args.len() != 5 {
        return Err("usage: sample_curve CURVE.toml LO_BOHR HI_BOHR POINTS".into());
    }
    let setup = read_curve_file(Path::new(&args[1]), &PairOverride::default())?;
    let (lo, hi, n): (f64, f64, usize) = (args[2].parse()?, args[3].parse()?, args[4].parse()?);
    println!("# reduced_mass_me {}", setup.pair.reduced_mass());
    println!(
        "# limit_hartree {}",
        setup.curve.limit().unwrap_or(f64::NAN)
    );
    for k in 0..n {
        let r = lo + (hi - lo) * k as f64 / (n - 1) as f64;
        println!("{}", setup.curve.value(r));
    }
    Ok(())
}
