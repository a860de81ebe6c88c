//! Library use: the bound levels of a Morse curve built from handbook constants, compared with
//! Morse's exact formula. Run: cargo run --release --example morse_levels
//! (HCl constants from Huber & Herzberg (1979): omega_e = 2990.9463 cm-1,
//! omega_e x_e = 52.8186 cm-1, r_e = 1.27455 angstrom.)

use rungs::curve::Morse;
use rungs::masses::{Atom, Pair};
use rungs::solver::{solve, RadialProblem, SolverSettings};
use rungs::units::{from_angstrom, from_wavenumber, to_wavenumber};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let pair = Pair::new(Atom::parse("1H")?, Atom::parse("35Cl")?, 0);
    let mu = pair.reduced_mass();
    let morse = Morse::from_spectroscopic(
        from_wavenumber(2990.9463),
        from_wavenumber(52.8186),
        from_angstrom(1.27455),
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
