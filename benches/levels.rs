//! Speed of the level solver on the three cases (criterion). Run: cargo bench
//! P1: all J = 0 levels of a light molecule (H2-like Morse, 18 levels) to 1e-6 cm-1.
//! P2: a heavy molecule with more than 100 levels (I2-like Morse, 174 levels) to 1e-5 cm-1.
//! P3: the whole bound (v, J) manifold of the H2 Born-Oppenheimer curve.
//! The peer script benches/peer_dvr.py times scipy's sinc-DVR on the same cases. Each case
//! runs twice: with D_v and H_v (the default) and with energies only (the peer's job).

use criterion::{criterion_group, criterion_main, Criterion};
use rungs::reader::{read_curve_file, PairOverride};
use rungs::solver::{solve, solve_manifold, RadialProblem, SolverSettings};
use rungs::units::from_wavenumber;
use std::path::Path;

#[path = "../tests/common/mod.rs"]
mod common;

fn bench_levels(c: &mut Criterion) {
    let (light, light_mu) = common::h2_morse();
    let (heavy, heavy_mu) = common::i2_morse();
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
    // The same three with energies and expectation values only (no D_v, H_v), which is what
    // the scipy peer computes.
    let energies = SolverSettings::default().with_distortion(false);
    group.bench_function("P1_energies_only", |b| {
        b.iter(|| solve(&RadialProblem::new(&light, light_mu, 0), &energies).unwrap())
    });
    group.bench_function("P2_energies_only", |b| {
        let settings = energies.clone().with_tolerance(from_wavenumber(1e-5));
        b.iter(|| solve(&RadialProblem::new(&heavy, heavy_mu, 0), &settings).unwrap())
    });
    group.bench_function("P3_energies_only", |b| {
        b.iter(|| solve_manifold(h2.curve.as_ref(), h2.pair.reduced_mass(), 0, &energies).unwrap())
    });
    group.finish();
}

criterion_group!(benches, bench_levels);
criterion_main!(benches);
