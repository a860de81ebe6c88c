//! Speed of the level solver on the three cases (criterion). Run: cargo bench
//! P1: all J = 0 levels of a light molecule (H2-like Morse, 18 levels) to 1e-6 cm-1.
//! P2: a heavy molecule with more than 100 levels (I2-like Morse, 174 levels) to 1e-5 cm-1.
//! P3: the whole bound (v, J) manifold of the H2 Born-Oppenheimer curve.
//! The peer script benches/peer_dvr.py times scipy's sinc-DVR on the same cases.

use criterion::{criterion_group, criterion_main, Criterion};
use rungs::curve::Morse;
use rungs::masses::{Atom, Pair};
use rungs::reader::{read_curve_file, PairOverride};
use rungs::solver::{solve, solve_manifold, RadialProblem, SolverSettings};
use rungs::units::{from_angstrom, from_wavenumber};
use std::path::Path;

fn mu_of(a: &str, b: &str) -> f64 {
    Pair::new(Atom::parse(a).unwrap(), Atom::parse(b).unwrap(), 0).reduced_mass()
}

fn bench_levels(c: &mut Criterion) {
    let light_mu = mu_of("1H", "1H");
    let light = Morse::from_spectroscopic(
        from_wavenumber(4401.213),
        from_wavenumber(121.336),
        from_angstrom(0.74144),
        light_mu,
    );
    let heavy_mu = mu_of("127I", "127I");
    let heavy = Morse::from_spectroscopic(
        from_wavenumber(214.502),
        from_wavenumber(0.6147),
        from_angstrom(2.6663),
        heavy_mu,
    );
    let h2 = read_curve_file(
        Path::new("curves/h2_born_oppenheimer.toml"),
        &PairOverride::default(),
    )
    .unwrap();
    let mut group = c.benchmark_group("levels");
    group.sample_size(10);
    group.bench_function("P1_light_morse_j0_1e-6", |b| {
        let settings = SolverSettings::default();
        b.iter(|| solve(&RadialProblem::new(&light, light_mu, 0), &settings).unwrap())
    });
    group.bench_function("P2_heavy_morse_j0_1e-5", |b| {
        let settings = SolverSettings::default().with_tolerance(from_wavenumber(1e-5));
        b.iter(|| solve(&RadialProblem::new(&heavy, heavy_mu, 0), &settings).unwrap())
    });
    group.bench_function("P3_h2_manifold_1e-6", |b| {
        let settings = SolverSettings::default();
        b.iter(|| solve_manifold(h2.curve.as_ref(), h2.pair.reduced_mass(), 0, &settings).unwrap())
    });
    group.finish();
}

criterion_group!(benches, bench_levels);
criterion_main!(benches);
