//! `retidose sources`: the built-in light sources, generators and reference tables.

use super::render::terminal;

/// Runs `retidose sources`.
pub fn run() -> String {
    terminal::sources::list()
}
