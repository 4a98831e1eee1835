//! The campaign file (or a folder of manifests) and its items: parse and check everything it
//! names before anything runs (a bad file is exit 2 naming the file and the place), expand
//! the routines into items in the order of a serial run, give each item a stable key and
//! hash (its shard), and the campaign a digest over everything it uses.

use std::path::{Component, Path as FsPath, PathBuf};

use anyhow::{anyhow, bail, Context, Result};
use serde::Deserialize;
use sha2::{Digest, Sha256};

/// The campaign file's `format` and the `version` this tancheck reads.
pub const FORMAT: &str = "tancheck-campaign";
pub const VERSION: u32 = 1;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct FileSpec {
    format: String,
    version: u32,
    name: Option<String>,
    #[serde(default)]
    libraries: Vec<LibrarySpec>,
    routines: Vec<RoutineEntry>,
}

/// A shared library the campaign builds once (with its complex-step twins) before its items
/// run: `sources` relative to the campaign file, `output` relative to the campaign file (or
/// put in `--build-dir`). A manifest whose `routine.library` is this output uses the build.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LibrarySpec {
    pub output: String,
    pub sources: Vec<String>,
}

/// A named set of property values replacing the manifest's.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PropertySet {
    pub name: String,
    pub values: Vec<f64>,
}

/// One routine of the campaign: its manifest and what to run on it.
#[derive(Clone, Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RoutineEntry {
    pub manifest: String,
    /// Property sets (default: the manifest's own properties).
    #[serde(default)]
    pub property_sets: Vec<PropertySet>,
    /// Paths: `SHAPE:PEAK:STEPS[:BACK]` or a path file relative to the campaign file
    /// (default: the manifest's own path).
    #[serde(default)]
    pub paths: Vec<String>,
    /// Probe suite files (relative to the campaign file) run besides the check.
    #[serde(default)]
    pub probes: Vec<String>,
    /// Run the tangent check (default true).
    #[serde(default = "yes")]
    pub check: bool,
    /// The expected outcome: pass (default), fail, fault or twin.
    pub expect: Option<String>,
    /// The expected finding (with `expect: fail`), e.g. `continuum-tangent`.
    pub expect_finding: Option<String>,
}

fn yes() -> bool {
    true
}

/// The kind of routine a manifest describes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Family {
    Point,
    Block,
    Finite,
}

/// What an item does. Another kind of item (a random-path exploration, say) is a variant
/// here, a field of [`RoutineEntry`] that asks for it, a line in `expand` and an arm in
/// `item::run_found`; the key, the hash, shards, merge and the reports need nothing more.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Task {
    /// Replay the regression cases of the routine (`tancheck-cases/<manifest>/`).
    Cases(PathBuf),
    Check,
    /// A probe suite file (absolute) and its label.
    Probe(PathBuf, String),
}

/// One unit of work.
#[derive(Clone, Debug)]
pub struct Item {
    pub position: usize,
    pub routine: usize,
    pub key: String,
    pub hash: u64,
    pub properties: Option<PropertySet>,
    /// The path's label as written, and the spec resolved (a file made absolute).
    pub path: Option<(String, String)>,
    pub task: Task,
}

impl Item {
    pub fn task_label(&self) -> String {
        match &self.task {
            Task::Cases(_) => "cases".into(),
            Task::Check => "check".into(),
            Task::Probe(_, label) => format!("probe {label}"),
        }
    }
}

/// A routine with its manifest found and read.
#[derive(Clone, Debug)]
pub struct Routine {
    pub entry: RoutineEntry,
    /// Absolute manifest path.
    pub manifest: PathBuf,
    /// The manifest relative to the campaign's folder (its label).
    pub label: String,
    pub family: Family,
    /// The symbol or model, for the report.
    pub name: String,
    /// The routine's library as the manifest names it (absolute, lexically normalized).
    pub library: Option<PathBuf>,
}

/// A campaign ready to run.
#[derive(Debug)]
pub struct Campaign {
    pub name: String,
    /// The campaign file or folder as given.
    pub source: PathBuf,
    /// The folder everything is relative to.
    pub dir: PathBuf,
    pub libraries: Vec<LibrarySpec>,
    pub routines: Vec<Routine>,
    pub items: Vec<Item>,
    pub digest: String,
}

/// FNV-1a, 64 bits (offset basis 0xcbf29ce484222325, prime 0x100000001b3), written out here
/// because the shard of an item must be the same on every machine and with every build of
/// tancheck: std's `DefaultHasher` is not stable across Rust releases (nor meant to be).
pub fn fnv1a64(bytes: &[u8]) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for &b in bytes {
        h ^= u64::from(b);
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    h
}

/// `p` absolute with `.` and `..` folded away (without touching the file system).
pub fn normalize(p: &FsPath) -> PathBuf {
    let abs = std::path::absolute(p).unwrap_or_else(|_| p.to_path_buf());
    let mut out = PathBuf::new();
    for c in abs.components() {
        match c {
            Component::ParentDir => {
                out.pop();
            }
            Component::CurDir => {}
            other => out.push(other),
        }
    }
    out
}

fn relative_label(path: &FsPath, dir: &FsPath) -> String {
    path.strip_prefix(dir).unwrap_or(path).display().to_string()
}

/// A JSON error with line and column, naming the file.
fn json_error(file: &FsPath, text: &str, e: &serde_json::Error) -> anyhow::Error {
    anyhow!("{}:{}:{}: {}", file.display(), e.line(), e.column(), crate::manifest::json_message(e, text))
}

impl Campaign {
    /// Read a campaign file, or a folder whose `*.json` files are each a manifest. Every
    /// file it names is read and checked here.
    pub fn load(source: &FsPath) -> Result<Campaign> {
        if source.is_dir() {
            return Campaign::from_folder(source);
        }
        let text = std::fs::read_to_string(source)
            .with_context(|| format!("{}: cannot read the campaign file", source.display()))?;
        let spec: FileSpec = serde_json::from_str(&text).map_err(|e| json_error(source, &text, &e))?;
        if spec.format != FORMAT {
            bail!("{}: `format` is `{}`; a campaign file says \"{FORMAT}\"", source.display(), spec.format);
        }
        if spec.version != VERSION {
            bail!(
                "{}: campaign file version {}; this tancheck reads version {VERSION}",
                source.display(),
                spec.version
            );
        }
        let dir =
            normalize(source.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(FsPath::new(".")));
        let name = spec.name.clone().unwrap_or_else(|| {
            source.file_stem().map(|s| s.to_string_lossy().into_owned()).unwrap_or_else(|| "campaign".into())
        });
        Campaign::build(name, source, dir, spec.libraries, spec.routines, text.as_bytes())
    }

    /// Every file the campaign reads or builds: the campaign file, the manifests, their
    /// libraries, the libraries it builds (as declared and under `build_dir`) and their
    /// sources, path files, probe suites and the case files of its cases items. A report
    /// written over one of them would replace it (a campaign's `--json` named its own library:
    /// the library became a report, and its stamp still said up to date; a user-style sweep).
    pub fn inputs(&self, build_dir: Option<&FsPath>) -> Vec<PathBuf> {
        let mut out = vec![self.source.clone()];
        for lib in &self.libraries {
            let declared = normalize(&self.dir.join(&lib.output));
            if let Some(d) = build_dir {
                let built = normalize(&d.join(declared.file_name().unwrap_or_default()));
                out.push(super::stamp::stamp_of(&built));
                out.push(built);
            }
            // The build's stamp beside the library (build.rs) is the campaign's too.
            out.push(super::stamp::stamp_of(&declared));
            out.push(declared);
            let sources: Vec<PathBuf> = lib.sources.iter().map(|s| normalize(&self.dir.join(s))).collect();
            out.extend(super::stamp::companions(&sources));
            out.extend(sources);
        }
        for r in &self.routines {
            out.push(r.manifest.clone());
            out.extend(r.library.clone());
        }
        for item in &self.items {
            if let Some((_, spec)) = &item.path {
                let p = PathBuf::from(spec);
                if p.is_file() {
                    out.push(p);
                }
            }
            match &item.task {
                Task::Probe(suite, _) => out.push(suite.clone()),
                Task::Cases(dir) => {
                    if let Ok(entries) = std::fs::read_dir(dir) {
                        out.extend(entries.filter_map(|e| e.ok().map(|e| e.path())));
                    }
                }
                Task::Check => {}
            }
        }
        out.sort();
        out.dedup();
        out
    }

    fn from_folder(folder: &FsPath) -> Result<Campaign> {
        let dir = normalize(folder);
        let mut files: Vec<PathBuf> = std::fs::read_dir(folder)
            .with_context(|| format!("{}: cannot list the folder", folder.display()))?
            .filter_map(|e| e.ok().map(|e| e.path()))
            .filter(|p| p.extension().is_some_and(|x| x == "json") && p.is_file() && !is_report(p))
            .collect();
        files.sort();
        if files.is_empty() {
            bail!("{}: the folder holds no manifest (*.json)", folder.display());
        }
        let routines = files
            .iter()
            .map(|f| RoutineEntry {
                manifest: f.file_name().unwrap().to_string_lossy().into_owned(),
                property_sets: Vec::new(),
                paths: Vec::new(),
                probes: Vec::new(),
                check: true,
                expect: None,
                expect_finding: None,
            })
            .collect();
        let name =
            dir.file_name().map(|s| s.to_string_lossy().into_owned()).unwrap_or_else(|| "campaign".into());
        Campaign::build(name, folder, dir, Vec::new(), routines, b"folder")
    }

    fn build(
        name: String,
        source: &FsPath,
        dir: PathBuf,
        libraries: Vec<LibrarySpec>,
        entries: Vec<RoutineEntry>,
        text: &[u8],
    ) -> Result<Campaign> {
        let file = source.display().to_string();
        let mut digest = Sha256::new();
        digest.update(b"tancheck-campaign 1\n");
        digest.update(text);
        let add_file = |label: &str, path: &FsPath, digest: &mut Sha256| -> Result<()> {
            let bytes = std::fs::read(path)
                .with_context(|| format!("{file}: {label}: cannot read {}", path.display()))?;
            digest.update(relative_label(path, &dir).as_bytes());
            digest.update(&bytes);
            Ok(())
        };
        for (k, lib) in libraries.iter().enumerate() {
            if lib.sources.is_empty() {
                bail!("{file}: libraries[{k}]: no sources");
            }
            for (j, s) in lib.sources.iter().enumerate() {
                add_file(&format!("libraries[{k}].sources[{j}]"), &dir.join(s), &mut digest)?;
            }
            // The headers and include files beside them, as the build's stamp takes them: shards
            // built from other code must not merge (editing an included file left the digest
            // as it was; a user-style sweep).
            let sources: Vec<PathBuf> = lib.sources.iter().map(|s| normalize(&dir.join(s))).collect();
            digest.update(super::stamp::sources_hash(&sources)?.as_bytes());
        }
        let mut routines = Vec::new();
        for (k, e) in entries.into_iter().enumerate() {
            let at = format!("routines[{k}]");
            let manifest = normalize(&dir.join(&e.manifest));
            add_file(&format!("{at}.manifest"), &manifest, &mut digest)?;
            if let Some(f) = &e.expect_finding {
                match super::findings::finding_check(f) {
                    Ok(()) => {}
                    Err(Some(word)) => bail!(
                        "{file}: {at}.expect_finding: `{f}` is no finding; did you mean `{word}`? (findings are \
                         written with hyphens)"
                    ),
                    // Not close to any (it was accepted, and every item of the routine read NOT AS
                    // EXPECTED, exit 1, as if the routine had changed; a user-style sweep).
                    Err(None) => bail!(
                        "{file}: {at}.expect_finding: `{f}` is no finding a check or probe gives (the \
                         README's \"Why a tangent fails\" lists a point check's causes; a probe item's \
                         finding is a probe's name)"
                    ),
                }
                if e.expect.is_none() {
                    bail!(
                        "{file}: {at}: `expect_finding` is `{f}` without `expect`, which is pass by default: a \
                         passing check has no finding; add \"expect\": \"fail\" (or fault, twin)"
                    );
                }
            }
            if let Some(x) = &e.expect {
                if !["pass", "fail", "fault", "twin"].contains(&x.as_str()) {
                    bail!("{file}: {at}.expect: `{x}`; one of pass, fail, fault, twin");
                }
                if let (Some(f), "pass") = (&e.expect_finding, x.as_str()) {
                    bail!(
                        "{file}: {at}: `expect` is pass and `expect_finding` is `{f}`: a passing check has \
                         no finding, so both cannot hold"
                    );
                }
            }
            let (family, name, library) =
                read_manifest(&manifest).map_err(|err| anyhow!("{file}: {at}: {err:#}"))?;
            if family != Family::Point && !e.probes.is_empty() {
                bail!("{file}: {at}.probes: probe suites are for point routines (a block or finite-strain manifest runs its own checks)");
            }
            if family == Family::Finite && !e.paths.is_empty() {
                bail!("{file}: {at}.paths: a finite-strain manifest keeps its own path");
            }
            for (j, p) in e.paths.iter().enumerate() {
                let resolved = resolve_path_spec(p, &dir);
                crate::manifest::path_arg(&resolved)
                    .map_err(|err| anyhow!("{file}: {at}.paths[{j}]: {err:#}"))?;
                if dir.join(p).is_file() {
                    add_file(&format!("{at}.paths[{j}]"), &dir.join(p), &mut digest)?;
                }
            }
            for (j, s) in e.probes.iter().enumerate() {
                let f = normalize(&dir.join(s));
                let suite = crate::suite::Suite::load(&f)
                    .map_err(|err| anyhow!("{file}: {at}.probes[{j}]: {err}"))?;
                add_file(&format!("{at}.probes[{j}]"), &f, &mut digest)?;
                // Every `at` of the suite on every path its items walk, as `probe --suite` asks
                // (past the end, it was dropped without a word and the probe judged at every
                // increment; a user-style sweep).
                for p in suite_paths(&e.paths, &dir, &manifest, &suite)? {
                    suite.check_at(&p).map_err(|err| anyhow!("{file}: {at}.probes[{j}] ({s}): {err}"))?;
                }
            }
            let label = relative_label(&manifest, &dir);
            routines.push(Routine { entry: e, manifest, label, family, name, library });
        }
        if routines.is_empty() {
            bail!("{file}: `routines` is empty");
        }
        let items = expand(&routines, &dir);
        // A key names one item in every report, shard and merge: two items with one key (a
        // property set, path or probe suite named twice, or a manifest listed twice) would be
        // taken for each other.
        let mut keys: Vec<(&str, usize)> = items.iter().map(|it| (it.key.as_str(), it.routine)).collect();
        keys.sort_unstable();
        if let Some(w) = keys.windows(2).find(|w| w[0].0 == w[1].0) {
            let (a, b) = (w[0].1.min(w[1].1), w[0].1.max(w[1].1));
            let where_ =
                if a == b { format!("routines[{a}]") } else { format!("routines[{a}] and routines[{b}]") };
            bail!(
                "{file}: {where_}: two items would have the key `{}`: give each property set, path and \
                 probe suite of a routine a name of its own, and list a manifest once",
                w[0].0
            );
        }
        for it in &items {
            digest.update(it.key.as_bytes());
            digest.update(b"\n");
        }
        let digest: String = digest.finalize().iter().map(|b| format!("{b:02x}")).collect();
        Ok(Campaign { name, source: source.to_path_buf(), dir, libraries, routines, items, digest })
    }
}

/// A path argument with a file made relative to the campaign's folder.
fn resolve_path_spec(p: &str, dir: &FsPath) -> String {
    if dir.join(p).is_file() {
        dir.join(p).display().to_string()
    } else {
        p.to_string()
    }
}

/// The family, name and library of a manifest (read and checked in full).
fn read_manifest(path: &FsPath) -> Result<(Family, String, Option<PathBuf>)> {
    let folder = path.parent().unwrap_or(FsPath::new("."));
    if crate::finite_load::FiniteManifest::detect(path) {
        let (m, _, _) = crate::finite_load::FiniteManifest::load(path)?;
        let name = m.routine.symbol.clone().or(m.routine.model.clone()).unwrap_or_default();
        return Ok((Family::Finite, name, m.routine.library.as_ref().map(|l| normalize(&folder.join(l)))));
    }
    let (m, _) = crate::manifest::Manifest::load(path)?;
    // What the manifest itself says of its sizes, before anything runs (a start state of
    // another length was found only when its item ran, after the others; a user-style sweep).
    if let (Some(n), Some(s)) = (m.routine.states, &m.start.state) {
        if s.len() != n {
            bail!("{}: start.state has {} entries; routine.states is {n}", path.display(), s.len());
        }
    }
    let family = if crate::block_session::is_block(&m) { Family::Block } else { Family::Point };
    let name = m.routine.symbol.clone().or(m.routine.model.clone()).unwrap_or_default();
    Ok((family, name, m.routine.library.as_ref().map(|l| normalize(&folder.join(l)))))
}

/// The items in serial order: first the regression cases of every routine that has a case
/// folder, then per routine, per property set and per path, the check and each probe suite.
fn expand(routines: &[Routine], dir: &FsPath) -> Vec<Item> {
    let mut items = Vec::new();
    let mut push =
        |routine: usize, properties: Option<PropertySet>, path: Option<(String, String)>, task: Task| {
            let r: &Routine = &routines[routine];
            let t = match &task {
                Task::Cases(_) => "cases".to_string(),
                Task::Check => "check".to_string(),
                Task::Probe(_, l) => format!("probe:{l}"),
            };
            let key = format!(
                "routine={};properties={};path={};task={t}",
                r.label,
                properties.as_ref().map_or("manifest", |p| p.name.as_str()),
                path.as_ref().map_or("manifest", |p| p.0.as_str()),
            );
            let hash = fnv1a64(key.as_bytes());
            items.push(Item { position: items.len(), routine, key, hash, properties, path, task });
        };
    // A manifest's cases replay once, however often it is listed (listed twice, with its
    // property sets expected to pass and to fail, a campaign was refused once `bisect` had
    // written its cases: two `cases` items had one key; a user-style sweep).
    let mut seen: Vec<PathBuf> = Vec::new();
    for (k, r) in routines.iter().enumerate() {
        let folder = r.manifest.parent().unwrap_or(dir);
        let cases = crate::case_store::default_case_dir(&r.manifest, folder);
        if cases.is_dir() && !seen.contains(&cases) {
            seen.push(cases.clone());
            push(k, None, None, Task::Cases(cases));
        }
    }
    for (k, r) in routines.iter().enumerate() {
        let e = &r.entry;
        let sets: Vec<Option<PropertySet>> = if e.property_sets.is_empty() {
            vec![None]
        } else {
            e.property_sets.iter().cloned().map(Some).collect()
        };
        let paths: Vec<Option<(String, String)>> = if e.paths.is_empty() {
            vec![None]
        } else {
            e.paths.iter().map(|p| Some((p.clone(), resolve_path_spec(p, dir)))).collect()
        };
        for s in &sets {
            for p in &paths {
                if e.check {
                    push(k, s.clone(), p.clone(), Task::Check);
                }
                for suite in &e.probes {
                    push(k, s.clone(), p.clone(), Task::Probe(normalize(&dir.join(suite)), suite.clone()));
                }
            }
        }
    }
    items
}

/// The paths a probe item of `suite` walks: the entry's `paths`, else the manifest's path, else
/// the suite's own (as the item chooses them).
fn suite_paths(
    paths: &[String],
    dir: &FsPath,
    manifest: &FsPath,
    suite: &crate::suite::Suite,
) -> Result<Vec<tancheck_core::path::Path>> {
    if !paths.is_empty() {
        return paths.iter().map(|p| crate::manifest::path_arg(&resolve_path_spec(p, dir))).collect();
    }
    let (m, _) = crate::manifest::Manifest::load(manifest)?;
    match &m.path {
        Some(p) => {
            Ok(vec![crate::manifest::path_from_spec(p).map_err(|e| anyhow!("{}: {e}", manifest.display()))?])
        }
        None => Ok(suite.path().ok().into_iter().collect()),
    }
}

/// Whether the JSON file at `p` is a tancheck report (its `format`, the document's first
/// field): a folder campaign reads its manifests, not the reports a run left beside them (its
/// second run read its own earlier report as a manifest; a user-style sweep).
fn is_report(p: &FsPath) -> bool {
    use std::io::Read;
    let mut head = [0u8; 256];
    let n = std::fs::File::open(p).and_then(|mut f| f.read(&mut head)).unwrap_or(0);
    let text = String::from_utf8_lossy(&head[..n]);
    let compact: String = text.chars().filter(|c| !c.is_whitespace()).collect();
    compact.starts_with(&format!("{{\"format\":\"{}\"", crate::report::campaign::FORMAT))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fnv1a64_matches_the_published_test_vectors() {
        // Test vectors of the FNV reference (Fowler, Noll, Vo): "" and "a", "foobar".
        assert_eq!(fnv1a64(b""), 0xcbf2_9ce4_8422_2325);
        assert_eq!(fnv1a64(b"a"), 0xaf63_dc4c_8601_ec8c);
        assert_eq!(fnv1a64(b"foobar"), 0x8594_4171_f739_67e8);
    }

    #[test]
    fn normalize_folds_parent_folders() {
        assert_eq!(normalize(FsPath::new("/a/b/../c/./d")), PathBuf::from("/a/c/d"));
    }

    // The digest covers the headers beside a library's sources, as the build's stamp does
    // (editing an included file left it as it was; a user-style sweep).
    #[test]
    fn the_digest_follows_a_header_beside_the_sources() {
        let d = std::env::temp_dir().join(format!("tancheck-digest-{}", std::process::id()));
        std::fs::create_dir_all(&d).unwrap();
        std::fs::write(d.join("r.c"), "#include \"core.h\"\n").unwrap();
        std::fs::write(d.join("core.h"), "static const double k = 1.0;\n").unwrap();
        std::fs::write(
            d.join("m.json"),
            r#"{ "routine": { "model": "elastic", "kind": "solid-3d", "properties": [200000, 0.3] } }"#,
        )
        .unwrap();
        let file = d.join("c.json");
        std::fs::write(
            &file,
            r#"{ "format": "tancheck-campaign", "version": 1, "name": "d",
  "libraries": [ { "output": "libr.so", "sources": ["r.c"] } ], "routines": [ { "manifest": "m.json" } ] }"#,
        )
        .unwrap();
        let before = Campaign::load(&file).unwrap().digest;
        std::fs::write(d.join("core.h"), "static const double k = 2.0;\n").unwrap();
        let after = Campaign::load(&file).unwrap().digest;
        let _ = std::fs::remove_dir_all(&d);
        assert_ne!(before, after);
    }
}
