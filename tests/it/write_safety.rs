//! Files are never lost: `-o` refuses every kind of input of the run (the scenario, a spectrum
//! file, a transmittance file, a readings file, a hard link to the scenario), compared by file
//! identity, even with `--force`, and leaves it byte for byte as it was.

use assert_cmd::Command;
use predicates::prelude::*;

#[test]
fn dash_o_refuses_every_input_of_the_run_even_with_force() {
    let d = std::env::temp_dir().join(format!("retidose-write-{}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    let viv = String::from_utf8(
        Command::cargo_bin("retidose")
            .unwrap()
            .args(["assess", "--example", "vivarium"])
            .output()
            .unwrap()
            .stdout,
    )
    .unwrap();
    std::fs::write(d.join("lamp.csv"), "# kind: irradiance\n400,1\n500,1\n600,1\n700,1\n").unwrap();
    std::fs::write(d.join("wall.csv"), "wavelength_nm,transmittance\n380,0.5\n780,0.9\n").unwrap();
    std::fs::write(d.join("lux.csv"), "rack,shelf,column,lux\nA,1,1,120\n").unwrap();
    let text = viv
        .replacen("spectrum = \"warm-white-led\"", "spectrum = \"lamp.csv\"", 1)
        .replacen("transmittance = \"0.8\"", "file = \"wall.csv\"", 1)
        .replace("leak = \"0.3 lx\"", "leak = \"0.3 lx\"\nreadings = \"lux.csv\"");
    let scenario = d.join("room.toml");
    std::fs::write(&scenario, &text).unwrap();
    let link = d.join("room-link.toml");
    let _ = std::fs::remove_file(&link);
    std::fs::hard_link(&scenario, &link).unwrap();
    // The scenario runs as written.
    Command::cargo_bin("retidose").unwrap().args(["assess", scenario.to_str().unwrap()]).assert().code(1);
    for target in ["room.toml", "lamp.csv", "wall.csv", "lux.csv", "room-link.toml"] {
        let p = d.join(target);
        let before = std::fs::read(&p).unwrap();
        Command::cargo_bin("retidose")
            .unwrap()
            .args(["assess", scenario.to_str().unwrap(), "-o", p.to_str().unwrap(), "--force"])
            .assert()
            .code(2)
            .stderr(predicate::str::contains("is an input of this run"));
        assert_eq!(std::fs::read(&p).unwrap(), before, "{target} changed");
    }
}
