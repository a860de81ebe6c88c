//! Library use: the bound levels of a Morse curve built from spectroscopic constants, compared
//! with Morse's exact formula. Run: cargo run --release --example morse_levels
//! INVENTED scenario: the constants (omega_e = 900 cm-1, omega_e x_e = 8.5 cm-1,
//! r_e = 1.56 angstrom, for the pair 7Li-19F) are made up, as in curves/demo_morse.toml.

use rungs::curve::Morse;
use rungs::masses::Pair;
use rungs::solver::{solve, RadialProblem, SolverSettings};
use rungs::units::{from_angstrom, from_wavenumber, to_wavenumber};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let pair = Pair::neutral("7Li", "19F")?;
    let mu = pair.reduced_mass();
    let morse = Morse::from_spectroscopic(
        from_wavenumber(900.0),
        from_wavenumber(8.5),
        from_angstrom(1.56),
        mu,
    );
    let set = solve(
        &RadialProblem::new(&morse, mu, 0),
        &SolverSettings::default(),
    )?;
    println!(
        "{}: {} bound levels (exact count {})",
        pair.label(),
        set.levels.len(),
        morse.exact_level_count(mu)
    );
    for level in set.levels.iter().take(5) {
        let exact = morse.exact_level(level.v, mu);
        println!(
            "v = {:2}  E = {:12.6} cm-1  exact - computed = {:+.1e} cm-1  B_v = {:.6} cm-1",
            level.v,
            to_wavenumber(level.energy),
            to_wavenumber(exact - level.energy),
            to_wavenumber(level.rotational_constant)
        );
    }
    Ok(())
}
