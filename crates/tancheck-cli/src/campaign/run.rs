//! Running a campaign's items: one after the other, on several threads (`--jobs`), or each in
//! its own worker process (`--isolate`: the tancheck program started again on one item, its
//! JSON read back), always giving the results in the items' serial order.

use std::io::Read;
use std::path::{Path as FsPath, PathBuf};
use std::process::{Command, Stdio};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::Mutex;
use std::time::{Duration, Instant};

use super::build::Built;
use super::file::{Campaign, Item};
use crate::report::campaign::{CampaignReport, ItemResult};

/// How the items run.
pub struct Runner<'a> {
    pub campaign: &'a Campaign,
    pub libs: &'a [Built],
    pub jobs: usize,
    /// Run each item in a worker: the program and the arguments that name the campaign
    /// (the worker gets `--item POSITION --json -` after them).
    pub isolate: Option<(PathBuf, Vec<std::ffi::OsString>)>,
    /// Time limit of one worker.
    pub item_timeout: f64,
}

impl Runner<'_> {
    /// The results of `items`, in their order.
    pub fn run(&self, items: &[&Item]) -> Vec<ItemResult> {
        let slots: Vec<Mutex<Option<ItemResult>>> = items.iter().map(|_| Mutex::new(None)).collect();
        let next = AtomicUsize::new(0);
        let threads = self.jobs.clamp(1, items.len().max(1));
        let (told, done) =
            (std::sync::atomic::AtomicBool::new(false), std::sync::atomic::AtomicBool::new(false));
        // Said once, when the stop signal arrives (not when an item in progress ends).
        let announce = || {
            let stop = tancheck_abi::watch::stop_signal();
            if stop != 0 && !told.swap(true, Ordering::SeqCst) {
                eprintln!(
                    "tancheck: {}: the items in progress finish and no new one starts; the reports then hold \
                     the items checked so far (send it again to end at once)",
                    super::item::signal_name(stop)
                );
            }
            stop
        };
        std::thread::scope(|s| {
            s.spawn(|| {
                while !done.load(Ordering::SeqCst) {
                    announce();
                    std::thread::sleep(Duration::from_millis(50));
                }
            });
            let mut workers = Vec::new();
            for _ in 0..threads {
                workers.push(s.spawn(|| loop {
                    if announce() != 0 {
                        break;
                    }
                    let k = next.fetch_add(1, Ordering::SeqCst);
                    if k >= items.len() {
                        break;
                    }
                    let mut r = self.one(items[k]);
                    // A worker of --isolate dies of the stop signal too (Ctrl-C reaches the
                    // whole process group): its item was not run, not faulty.
                    let stop = tancheck_abi::watch::stop_signal();
                    if stop != 0 && r.outcome == "fault" && self.isolate.is_some() {
                        r = super::item::not_run_result(self.campaign, items[k], stop);
                    }
                    *slots[k].lock().unwrap_or_else(std::sync::PoisonError::into_inner) = Some(r);
                }));
            }
            let joined: Vec<_> = workers.into_iter().map(|w| w.join()).collect();
            done.store(true, Ordering::SeqCst);
            // A worker's panic goes on as it did before the announcer thread.
            for j in joined {
                if let Err(e) = j {
                    std::panic::resume_unwind(e);
                }
            }
        });
        let stop = tancheck_abi::watch::stop_signal();
        slots
            .into_iter()
            .zip(items)
            .map(|(s, item)| {
                s.into_inner()
                    .unwrap_or_else(std::sync::PoisonError::into_inner)
                    .unwrap_or_else(|| super::item::not_run_result(self.campaign, item, stop))
            })
            .collect()
    }

    fn one(&self, item: &Item) -> ItemResult {
        match &self.isolate {
            None => super::item::run(self.campaign, item, self.libs),
            Some((program, args)) => self.in_worker(item, program, args),
        }
    }

    /// Run `item` in a worker process; a worker that dies or hangs is the item's fault.
    fn in_worker(&self, item: &Item, program: &FsPath, args: &[std::ffi::OsString]) -> ItemResult {
        let fault = |message: String| super::item::fault_result(self.campaign, item, message);
        let child = Command::new(program)
            .env(crate::isolate::PARENT_ENV, std::process::id().to_string())
            .args(args)
            .arg("--item")
            .arg(item.position.to_string())
            .arg("--json")
            .arg("-")
            .arg("--quiet")
            .stdin(Stdio::null())
            .stdout(Stdio::piped())
            .stderr(Stdio::piped())
            .spawn();
        let mut child = match child {
            Ok(c) => c,
            Err(e) => return fault(format!("could not start the worker {}: {e}", program.display())),
        };
        let mut stdout = child.stdout.take().expect("piped");
        let reader = std::thread::spawn(move || {
            let mut s = String::new();
            let _ = stdout.read_to_string(&mut s);
            s
        });
        // The worker's standard error is passed on when it ends, without its account of its
        // last words: the item's message holds them (a block saying "exit 70" stood above a
        // campaign that exited 3; a user-style sweep).
        let mut stderr = child.stderr.take().expect("piped");
        let err_reader = std::thread::spawn(move || {
            let mut s = String::new();
            let _ = stderr.read_to_string(&mut s);
            s
        });
        let started = Instant::now();
        let status = loop {
            match child.try_wait() {
                Ok(Some(st)) => break Some(st),
                Ok(None) if started.elapsed().as_secs_f64() > self.item_timeout => {
                    let _ = child.kill();
                    let _ = child.wait();
                    break None;
                }
                Ok(None) => std::thread::sleep(Duration::from_millis(10)),
                Err(_) => break None,
            }
        };
        let text = reader.join().unwrap_or_default();
        let said = crate::isolate::without_last_words(&err_reader.join().unwrap_or_default());
        if !said.is_empty() {
            use std::io::Write as _;
            let _ = std::io::stderr().write_all(said.as_bytes());
        }
        let Some(status) = status else {
            return fault(format!(
                "the worker was stopped after the item time limit of {} s",
                self.item_timeout
            ));
        };
        match CampaignReport::from_json(&text).ok().and_then(|r| r.items.into_iter().next()) {
            Some(r) => r,
            None => {
                use std::os::unix::process::ExitStatusExt;
                let how = match (status.code(), status.signal()) {
                    (Some(c), _) => format!("with exit code {c}"),
                    (None, Some(s)) => format!("by signal {s}"),
                    _ => "without a status".into(),
                };
                // A worker stopped by its watchdog, or whose routine ended the process, leaves
                // its last words on its output: what stopped it (a hang read "without a
                // report"; a user-style sweep).
                match last_words(&text) {
                    Some((words, increment)) => super::item::fault_at(
                        self.campaign,
                        item,
                        format!("the worker ended {how}: {words}"),
                        increment,
                    ),
                    None => fault(format!(
                        "the worker ended {how} without a report (the routine ended or broke its process)"
                    )),
                }
            }
        }
    }
}

/// The fault of a worker's last words (a JSON report of kind `last-words`), if its output holds
/// them: the message, when it happened and the running call's inputs in words, and the
/// increment (a hung item read "0 of 0 increments" with no call; a user-style sweep).
fn last_words(text: &str) -> Option<(String, Option<usize>)> {
    let v: serde_json::Value = serde_json::from_str(text.trim()).ok()?;
    if v["kind"] != "last-words" {
        return None;
    }
    let f = &v["fault"];
    let mut words = f["message"].as_str()?.to_string();
    if let Some(when) = f["when"].as_str().filter(|w| !w.is_empty()) {
        words.push_str(&format!(", {when}"));
    }
    if let Some(call) = f["call"].as_object() {
        let inputs: Vec<String> = ["strain", "dstrain", "stress0", "state0"]
            .iter()
            .filter_map(|k| call.get(*k).map(|x| format!("{k} {x}")))
            .collect();
        if !inputs.is_empty() {
            words.push_str(&format!("; the call's inputs: {}", inputs.join(", ")));
        }
    }
    let increment = f["increment"].as_u64().and_then(|k| usize::try_from(k).ok());
    Some((words, increment))
}
