use rungs::curve::Morse;
use rungs::solver::*;
use rungs::units::*;
#[test]
fn scratch() {
    let mu = from_dalton(1.007825031898 * 1.007825031898 / (2.0 * 1.007825031898));
    let morse = Morse::from_spectroscopic(
        from_wavenumber(4401.213),
        from_wavenumber(121.336),
        from_angstrom(0.74144),
        mu,
    );
    for method in [Method::Numerov] {
        let t = std::time::Instant::now();
        let set = solve(
            &RadialProblem::new(&morse, mu, 0),
            &SolverSettings::default().with_method(method),
        )
        .unwrap();
        println!(
            "{method:?} {:?} count {} exact {}",
            t.elapsed(),
            set.levels.len(),
            morse.exact_level_count(mu)
        );
        println!("{:?} grid {:?}", set.audit, set.finest_grid);
        for l in &set.levels {
            let exact = morse.exact_level(l.v, mu);
            println!(
                "v={} E={:.8} err={:.3e} est={:.2e} conv={}",
                l.v,
                to_wavenumber(l.energy),
                to_wavenumber(l.energy - exact),
                to_wavenumber(l.error_estimate),
                l.converged
            );
        }
    }
}
