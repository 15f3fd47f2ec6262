//! Speed of housing surveys (run with `cargo bench`): 100 000 cage positions (a 1000-shelf ×
//! 100-column grid under four ceiling luminaires), from room lux to rod bleach and flags. The
//! per-lux spectral factors are computed once per survey, in the setup, as `assess` does.

use retidose::cornea::filter::Filter;
use retidose::housing::guidance::find_guidance;
use retidose::housing::survey::{Luminaire, Rack, SurveyInput, illuminance_at, per_lux, run_survey};
use retidose::pigment::kinetics::{Model, find_pigment};
use retidose::retina::pupil::PupilRule;
use retidose::scenario::retina::{SubjectSpec, build};
use retidose::spectrum::source::resolve;

fn main() {
    divan::main();
}

#[divan::bench(sample_count = 30)]
fn survey_100_000_positions(bencher: divan::Bencher) {
    let pigment = find_pigment("mouse-rod").unwrap();
    let subject =
        SubjectSpec { species: "mouse".into(), pupil: Some("light".into()), ..SubjectSpec::default() };
    let view = build(&subject, &[], &[], None).unwrap();
    let wall = Filter::flat(0.8, "cage wall").unwrap();
    let light =
        per_lux(&view, &resolve("neutral-white-led", None).unwrap(), &wall, PupilRule::LightAdapted).unwrap();
    let dark =
        per_lux(&view, &resolve("warm-white-led", None).unwrap(), &wall, PupilRule::DarkAdapted).unwrap();
    let nrc = find_guidance("nrc-guide-2011").unwrap();
    let rack = Rack {
        shelves: 1000,
        columns: 100,
        x0_m: 0.0,
        column_spacing_m: 0.05,
        y_m: 0.5,
        bottom_m: 0.2,
        shelf_spacing_m: 0.002,
    };
    let positions = rack.positions().unwrap();
    let luminaires: Vec<Luminaire> = (0..4)
        .map(|i| Luminaire { x_m: 1.0 + 1.0 * f64::from(i), y_m: 1.2, z_m: 2.8, intensity_cd: 900.0 })
        .collect();
    bencher.bench(|| {
        let room_lux: Vec<f64> = positions.iter().map(|p| illuminance_at(p, &luminaires, 0.999)).collect();
        let input = SurveyInput {
            positions: positions.clone(),
            dark_room_lux: vec![0.3; room_lux.len()],
            room_lux,
            cage_transmittance: 0.8,
            light,
            dark,
            pigment: &pigment,
            model: Model::RateLimited,
            albino: true,
            guidance: &[nrc],
        };
        run_survey(divan::black_box(&input)).unwrap()
    });
}
