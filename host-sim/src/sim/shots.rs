//! `leeward shots`: run a key script headless from power-on and write a PNG at each
//! `@name` of the script.

use super::script::{self, Step};
use super::{picture, Device};
use crate::CliError;
use std::path::Path;

/// Help text of `leeward shots` (the script syntax; the manual has the same).
pub const SHOTS_HELP: &str = "\
SCRIPT is plain text, read token by token (tokens are separated by spaces or line ends):
  ok back menu up down left right del dot sign   a key by name (any case)
  45.5  -10.25                                   digits, '.' and '-' typed key by key
  TOKEN*N                                        TOKEN repeated N times (1 to 999), e.g. del*14
  @NAME                                          screenshot here, written as DIR/NAME.png
                                                 (NAME: a-z, 0-9, - and _, once per script)
  # ...                                          a comment, to the end of the line
The device starts from power-on, as `leeward sim` does. An unknown key name or a bad token exits with status 2 and names the token and its line; \
nothing is written then. With --json the list of screenshots is one JSON object.";

/// Run `script_path`, writing its screenshots into `out_dir`; the report lists the files
/// (with `json`, as `{"shots": [{"name", "file", "after_keys"}]}`).
pub fn run(script_path: &Path, out_dir: &Path, json: bool) -> Result<String, CliError> {
    let shown = script_path.display();
    let text = std::fs::read_to_string(script_path)
        .map_err(|e| CliError::input(format!("{shown}: cannot read the key script: {e}")))?;
    let steps = script::parse(&text).map_err(|e| CliError::input(format!("{shown}: {e}")))?;
    std::fs::create_dir_all(out_dir).map_err(|e| {
        CliError::input(format!(
            "{}: cannot create the folder: {e}",
            out_dir.display()
        ))
    })?;
    let scratch = super::store::Scratch::new();
    let mut device = Device::power_on(&scratch.0)?;
    let mut report = String::new();
    let mut taken = Vec::new();
    let mut presses = 0usize;
    for step in steps {
        match step {
            Step::Press(k) => {
                device.press(k);
                presses += 1;
            }
            Step::Shot(name) => {
                let path = out_dir.join(format!("{name}.png"));
                picture::save_png(&device.frame(), &path).map_err(|e| {
                    CliError::input(format!("{}: cannot write: {e}", path.display()))
                })?;
                report.push_str(&format!("{} (after {presses} keys)\n", path.display()));
                taken.push(serde_json::json!({
                    "name": name,
                    "file": path.display().to_string(),
                    "after_keys": presses,
                }));
            }
        }
    }
    if json {
        return Ok(format!("{}\n", serde_json::json!({ "shots": taken })));
    }
    if report.is_empty() {
        report.push_str("no screenshots: the script has no @NAME\n");
    }
    Ok(report)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_help_names_every_key() {
        for (name, _) in super::super::keys::NAMES {
            assert!(
                SHOTS_HELP.contains(name),
                "{name} missing from the shots help"
            );
        }
    }
}
