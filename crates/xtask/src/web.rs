//! The browser workbench's toolchain and a small static file server for `serve` and the browser tests.

use crate::run::{cargo, root, run};
use std::io::{BufRead, BufReader, Write};
use std::net::{TcpListener, TcpStream};
use std::path::{Path, PathBuf};

/// Trunk release line that builds with this toolchain (0.22 needs a newer rustc).
const TRUNK: &str = "~0.21";

/// The wasm-bindgen version pinned in web/Cargo.toml (the CLI must match it exactly).
fn wasm_bindgen_version() -> Result<String, String> {
    let lock = std::fs::read_to_string(root().join("Cargo.lock"))
        .map_err(|e| format!("Cargo.lock: {e}"))?;
    let mut lines = lock.lines();
    while let Some(l) = lines.next() {
        if l == "name = \"wasm-bindgen\""
            && let Some(v) = lines.next().and_then(|v| v.strip_prefix("version = \""))
        {
            return Ok(v.trim_end_matches('"').to_string());
        }
    }
    Err("wasm-bindgen is not in Cargo.lock".into())
}

fn cargo_bin(name: &str) -> PathBuf {
    let home = std::env::var("CARGO_HOME")
        .map(PathBuf::from)
        .unwrap_or_else(|_| {
            PathBuf::from(std::env::var("HOME").unwrap_or_default()).join(".cargo")
        });
    home.join("bin").join(name)
}

fn has_version(program: &Path, want: &str) -> bool {
    std::process::Command::new(program)
        .arg("--version")
        .output()
        .map(|o| String::from_utf8_lossy(&o.stdout).contains(want))
        .unwrap_or(false)
}

/// Installs what the web build needs when missing: the wasm target, Trunk, the matching
/// wasm-bindgen CLI, and the npm packages (binaryen's wasm-opt, playwright-core).
pub fn ensure_tools() -> Result<(), String> {
    crate::run::ensure_wasm_target()?;
    if !has_version(&cargo_bin("trunk"), "trunk 0.21") {
        cargo(&["install", "trunk", "--version", TRUNK, "--locked"])?;
    }
    let wbg = wasm_bindgen_version()?;
    if !has_version(&cargo_bin("wasm-bindgen"), &wbg) {
        // Not --locked: one of its locked dependencies is no longer on the registry.
        cargo(&[
            "install",
            "wasm-bindgen-cli",
            "--version",
            &format!("={wbg}"),
        ])?;
    }
    let e2e = root().join("tests/e2e");
    if !e2e.join("node_modules/.bin/wasm-opt").exists()
        || !e2e.join("node_modules/playwright-core").exists()
    {
        run(
            "npm",
            &[
                "install",
                "--prefix",
                e2e.to_str().unwrap(),
                "--no-audit",
                "--no-fund",
            ],
        )?;
    }
    Ok(())
}

/// PATH with the npm tools and cargo's bin first.
fn tool_path() -> String {
    let e2e = root().join("tests/e2e/node_modules/.bin");
    format!(
        "{}:{}:{}",
        e2e.display(),
        cargo_bin("").display(),
        std::env::var("PATH").unwrap_or_default()
    )
}

/// Builds the release bundle into dist/ with Trunk.
pub fn build() -> Result<(), String> {
    ensure_tools()?;
    cargo(&["fetch"])?;
    let status = std::process::Command::new(cargo_bin("trunk"))
        .args(["build", "--release", "--skip-version-check"])
        .current_dir(root())
        .env("PATH", tool_path())
        .status()
        .map_err(|e| format!("cannot start trunk: {e}"))?;
    if !status.success() {
        return Err(format!("trunk build failed ({status})"));
    }
    Ok(())
}

fn mime(path: &Path) -> &'static str {
    match path.extension().and_then(|e| e.to_str()) {
        Some("html") => "text/html; charset=utf-8",
        Some("js") => "text/javascript",
        Some("wasm") => "application/wasm",
        Some("css") => "text/css",
        Some("svg") => "image/svg+xml",
        Some("webmanifest") => "application/manifest+json",
        Some("json") => "application/json",
        _ => "application/octet-stream",
    }
}

fn respond(mut stream: TcpStream, dist: &Path) {
    let mut reader = BufReader::new(match stream.try_clone() {
        Ok(s) => s,
        Err(_) => return,
    });
    let mut request = String::new();
    if reader.read_line(&mut request).is_err() {
        return;
    }
    // Drain the headers.
    let mut line = String::new();
    while reader.read_line(&mut line).map(|n| n > 2).unwrap_or(false) {
        line.clear();
    }
    let path = request.split_whitespace().nth(1).unwrap_or("/");
    let path = path.split(['?', '#']).next().unwrap_or("/");
    let rel = path.trim_start_matches('/');
    let file = if rel.is_empty() || rel.contains("..") {
        dist.join("index.html")
    } else {
        dist.join(rel)
    };
    let (status, body, kind) = match std::fs::read(&file) {
        Ok(b) => ("200 OK", b, mime(&file)),
        Err(_) => ("404 Not Found", b"not found".to_vec(), "text/plain"),
    };
    // Cross-origin isolation (the workbench loads nothing from elsewhere) gives the page
    // performance.now() at microsecond resolution instead of a tenth of a millisecond, so the
    // browser benchmark can time a stroke that takes a fraction of a millisecond.
    let head = format!(
        "HTTP/1.1 {status}\r\nContent-Type: {kind}\r\nContent-Length: {}\r\nCache-Control: no-cache\r\nCross-Origin-Opener-Policy: same-origin\r\nCross-Origin-Embedder-Policy: require-corp\r\nConnection: close\r\n\r\n",
        body.len()
    );
    let _ = stream.write_all(head.as_bytes());
    let _ = stream.write_all(&body);
}

/// Serves `dist` on 127.0.0.1:`port` (0 picks a free port) in a background thread; returns the address.
pub fn serve_background(dist: PathBuf, port: u16) -> Result<String, String> {
    let listener = TcpListener::bind(("127.0.0.1", port))
        .map_err(|e| format!("cannot listen on 127.0.0.1:{port}: {e}"))?;
    let addr = format!(
        "http://{}/",
        listener.local_addr().map_err(|e| e.to_string())?
    );
    std::thread::spawn(move || {
        for stream in listener.incoming().flatten() {
            let dist = dist.clone();
            std::thread::spawn(move || respond(stream, &dist));
        }
    });
    Ok(addr)
}

/// `cargo xtask serve`: build, serve, print the address, run until interrupted.
pub fn serve() -> Result<(), String> {
    build()?;
    let addr = serve_background(root().join("dist"), 8917)?;
    println!("\nTraycast workbench: {addr}  (opens on the lunch-tray demo; Ctrl+C stops)");
    loop {
        std::thread::park();
    }
}

/// Runs the web crate's wasm-bindgen tests in headless Chromium (chromedriver from Debian).
pub fn component_tests() -> Result<(), String> {
    ensure_tools()?;
    ensure_chromium()?;
    let status =
        std::process::Command::new(std::env::var("CARGO").unwrap_or_else(|_| "cargo".into()))
            .args([
                "test",
                "--target",
                "wasm32-unknown-unknown",
                "--package",
                "traycast-web",
            ])
            .current_dir(root())
            .env("PATH", tool_path())
            .env("CHROMEDRIVER", "/usr/bin/chromedriver")
            .env(
                "CARGO_TARGET_WASM32_UNKNOWN_UNKNOWN_RUNNER",
                cargo_bin("wasm-bindgen-test-runner"),
            )
            .status()
            .map_err(|e| format!("cannot start cargo: {e}"))?;
    if !status.success() {
        return Err("web component tests failed".into());
    }
    Ok(())
}

/// Debian's Chromium and ChromeDriver (never a browser download of a test tool's own).
fn ensure_chromium() -> Result<(), String> {
    if !Path::new("/usr/bin/chromium").exists() || !Path::new("/usr/bin/chromedriver").exists() {
        run(
            "sh",
            &[
                "-c",
                "apt-get update -qq && apt-get install -y -qq chromium chromium-driver",
            ],
        )?;
    }
    Ok(())
}

/// Links the browser must refuse that only the Rust side can make: a decompression bomb (8 MiB of
/// zeros deflated) and a well-formed plan of absurd size. JSON array of fragments.
fn hostile_links() -> Result<String, String> {
    use base64::Engine;
    let bomb = miniz_oxide::deflate::compress_to_vec(&vec![0u8; 8 << 20], 10);
    let bomb = format!(
        "#tc1.{}",
        base64::engine::general_purpose::URL_SAFE_NO_PAD.encode(bomb)
    );
    let mut huge = traycast_plan::model::Plan::blank(4000, 2, 5.0);
    huge.name = "absurd".into();
    let absurd = format!("#{}", traycast_plan::wire::to_link(&huge));
    serde_json::to_string(&[bomb, absurd]).map_err(|e| e.to_string())
}

/// Runs the browser end-to-end tests (tests/e2e/run.mjs) against a fresh build.
pub fn e2e() -> Result<(), String> {
    build()?;
    let addr = serve_background(root().join("dist"), 0)?;
    let cli = root().join("target/release/traycast");
    // Always (a no-op when current): a stale binary would compare the page with old code.
    cargo(&["build", "--release", "--package", "traycast-cli"])?;
    ensure_chromium()?;
    let status = std::process::Command::new("node")
        .arg(root().join("tests/e2e/run.mjs"))
        .env("TRAYCAST_HOSTILE", hostile_links()?)
        .env("TRAYCAST_URL", &addr)
        .env("TRAYCAST_CLI", &cli)
        .env("TRAYCAST_ARTIFACTS", root().join("target/e2e"))
        .status()
        .map_err(|e| format!("cannot start node: {e}"))?;
    if !status.success() {
        return Err("browser tests failed".into());
    }
    Ok(())
}
