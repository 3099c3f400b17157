//! Running commands and installing what the project needs on a fresh machine.

use std::path::PathBuf;
use std::process::Command;

/// The workspace root (two levels above this crate).
pub fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .ancestors()
        .nth(2)
        .expect("xtask lives in crates/xtask")
        .to_path_buf()
}

/// Runs a command, echoing it, failing on a non-zero exit.
pub fn run(program: &str, args: &[&str]) -> Result<(), String> {
    println!("$ {program} {}", args.join(" "));
    let status = Command::new(program)
        .args(args)
        .status()
        .map_err(|e| format!("cannot start {program}: {e}"))?;
    if status.success() {
        Ok(())
    } else {
        Err(format!("`{program} {}` failed ({status})", args.join(" ")))
    }
}

/// Runs cargo with the toolchain that runs xtask.
pub fn cargo(args: &[&str]) -> Result<(), String> {
    let cargo = std::env::var("CARGO").unwrap_or_else(|_| "cargo".into());
    run(&cargo, args)
}

/// Output of a command that must succeed.
pub fn output(program: &str, args: &[&str]) -> Result<String, String> {
    let out = Command::new(program)
        .args(args)
        .output()
        .map_err(|e| format!("cannot start {program}: {e}"))?;
    if !out.status.success() {
        return Err(format!(
            "`{program} {}` failed: {}",
            args.join(" "),
            String::from_utf8_lossy(&out.stderr)
        ));
    }
    Ok(String::from_utf8_lossy(&out.stdout).into_owned())
}

/// Adds the wasm32 target through rustup if it is missing.
pub fn ensure_wasm_target() -> Result<(), String> {
    let installed = output("rustup", &["target", "list", "--installed"])?;
    if !installed
        .lines()
        .any(|l| l.trim() == "wasm32-unknown-unknown")
    {
        run("rustup", &["target", "add", "wasm32-unknown-unknown"])?;
    }
    Ok(())
}

/// Adds rustup components (rustfmt, clippy) if missing.
pub fn ensure_components(names: &[&str]) -> Result<(), String> {
    let installed = output("rustup", &["component", "list", "--installed"])?;
    for name in names {
        if !installed.lines().any(|l| l.starts_with(name)) {
            run("rustup", &["component", "add", name])?;
        }
    }
    Ok(())
}

/// Makes sure `import module` works in python3, installing `spec` with pip otherwise.
pub fn ensure_python_module(module: &str, spec: &str) -> Result<(), String> {
    let probe = Command::new("python3")
        .args(["-c", &format!("import {module}")])
        .status()
        .map_err(|e| format!("cannot start python3: {e}"))?;
    if !probe.success() {
        run("python3", &["-m", "pip", "install", "--quiet", spec])?;
    }
    Ok(())
}
