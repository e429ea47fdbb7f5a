//! The simulation for the page (wasm32 only): [`SimWorker`] runs blocks inside a Web
//! Worker, with its own copy of the dataset, and posts each block's partial result to
//! the page as typed arrays; [`SimResults`] merges them on the page in block order and
//! gives the summary and the download, byte for byte what `stratamap simulate` prints.
//!
//! A block message is `{type: "block", generation, block, runs, wins: Uint32Array,
//! tipping: Uint32Array, majority: Uint32Array, seats: Uint32Array, shares:
//! Float64Array}` (the arrays of [`BlockResult`], their buffers transferred).

use super::wasm::Engine;
use crate::analysis::simulate::{
    scenario_with_runs, BlockResult, Labels, Merged, Plan, Scratch, MAX_RUNS,
};
use crate::dataset::{Dataset, Sources};
use crate::model::scenario::Scenario;
use js_sys::{Array, Float64Array, Object, Reflect, Uint32Array};
use wasm_bindgen::prelude::*;
use wasm_bindgen::JsCast;

/// Plain objects, not `Map`s, and numbers for 64-bit integers (as the engine's facade).
fn to_js<T: serde::Serialize + ?Sized>(v: &T) -> JsValue {
    v.serialize(&serde_wasm_bindgen::Serializer::json_compatible())
        .unwrap_or(JsValue::NULL)
}

fn set(o: &Object, key: &str, v: &JsValue) -> Result<(), JsError> {
    Reflect::set(o, &JsValue::from_str(key), v)
        .map(|_| ())
        .map_err(|_| JsError::new("cannot build the block message"))
}

fn get(o: &JsValue, key: &str) -> Result<JsValue, JsError> {
    Reflect::get(o, &JsValue::from_str(key))
        .map_err(|_| JsError::new(&format!("the block message has no {key}")))
}

fn get_u32(o: &JsValue, key: &str) -> Result<u32, JsError> {
    get(o, key)?
        .as_f64()
        .filter(|v| v.fract() == 0.0 && *v >= 0.0 && *v <= f64::from(u32::MAX))
        .map(|v| v as u32)
        .ok_or_else(|| JsError::new(&format!("the block message's {key} is not a count")))
}

fn get_u32s(o: &JsValue, key: &str) -> Result<Vec<u32>, JsError> {
    get(o, key)?
        .dyn_into::<Uint32Array>()
        .map(|a| a.to_vec())
        .map_err(|_| JsError::new(&format!("the block message's {key} is not a Uint32Array")))
}

/// Runs blocks of one dataset's simulation inside a worker.
#[wasm_bindgen]
pub struct SimWorker {
    ds: Dataset,
    plan: Option<Plan>,
    scratch: Scratch,
}

#[wasm_bindgen]
impl SimWorker {
    /// Parse and validate the dataset once for this worker.
    #[wasm_bindgen(constructor)]
    pub fn new(
        manifest: &str,
        districts: &str,
        electorate: &str,
        poll: Option<String>,
    ) -> Result<SimWorker, JsError> {
        let ds = Dataset::from_sources(&Sources {
            manifest,
            districts,
            electorate,
            poll: poll.as_deref(),
        })
        .map_err(|e| JsError::new(&e.to_string()))?;
        Ok(SimWorker {
            ds,
            plan: None,
            scratch: Scratch::default(),
        })
    }

    /// The scenario (read as the page reads it) and the number of runs.
    #[wasm_bindgen(js_name = setScenario)]
    pub fn set_scenario(&mut self, query: &str, runs: u32) {
        let s = Scenario::parse(query, &self.ds).scenario;
        self.plan = Some(Plan::new(&self.ds, &s, runs));
    }

    /// Block `b` as a message object (also what [`SimWorker::run_blocks`] posts).
    pub fn block(&mut self, generation: u32, block: u32) -> Result<Object, JsError> {
        let plan = self
            .plan
            .as_ref()
            .ok_or_else(|| JsError::new("no scenario set"))?;
        let r = plan.run_block(&self.ds, block, &mut self.scratch);
        let o = Object::new();
        set(&o, "type", &"block".into())?;
        set(&o, "generation", &generation.into())?;
        set(&o, "block", &r.block.into())?;
        set(&o, "runs", &r.runs.into())?;
        set(&o, "wins", &Uint32Array::from(&r.wins[..]).into())?;
        set(&o, "tipping", &Uint32Array::from(&r.tipping[..]).into())?;
        set(&o, "majority", &Uint32Array::from(&r.majority[..]).into())?;
        set(&o, "seats", &Uint32Array::from(&r.seats[..]).into())?;
        set(&o, "shares", &Float64Array::from(&r.shares[..]).into())?;
        Ok(o)
    }

    /// Run blocks `first … first + count − 1` (those that exist), posting each one's
    /// message to the page as it is done, its arrays' buffers transferred. Returns how
    /// many blocks were run.
    #[wasm_bindgen(js_name = runBlocks)]
    pub fn run_blocks(&mut self, generation: u32, first: u32, count: u32) -> Result<u32, JsError> {
        let scope: web_sys::DedicatedWorkerGlobalScope = js_sys::global()
            .dyn_into()
            .map_err(|_| JsError::new("runBlocks runs inside a dedicated worker"))?;
        let total = self.plan.as_ref().map_or(0, Plan::block_count);
        let last = first.saturating_add(count).min(total);
        for b in first..last {
            let msg = self.block(generation, b)?;
            let transfer = Array::new();
            for key in ["wins", "tipping", "majority", "seats", "shares"] {
                let a = get(&msg, key)?;
                transfer.push(&get(&a, "buffer")?);
            }
            scope
                .post_message_with_transfer(&msg, &transfer)
                .map_err(|_| JsError::new("cannot post the block"))?;
        }
        Ok(last.saturating_sub(first))
    }
}

/// The blocks of one simulation merged on the page, in block order.
#[wasm_bindgen]
pub struct SimResults {
    labels: Labels,
    merged: Merged,
    parties: usize,
    seed: u64,
    /// The canonical scenario string around its `runs=` value: (before, after).
    query: (String, String),
    runs: u32,
}

/// A `runs` value no scenario can have (the most is 100,000), marking where the runs go
/// in the canonical string.
const RUNS_MARK: &str = "runs=4294967295";

impl SimResults {
    /// Results for `query` (the page's reading) on a dataset; `runs` asked.
    pub(crate) fn for_dataset(ds: &Dataset, query: &str, runs: u32) -> SimResults {
        let s = Scenario::parse(query, ds).scenario;
        let marked = scenario_with_runs(ds, &s, u32::MAX);
        let (before, after) = marked.split_once(RUNS_MARK).unwrap_or((&marked, ""));
        SimResults {
            labels: Labels::of(ds),
            merged: Merged::new(ds.party_count(), ds.district_count()),
            parties: ds.party_count(),
            seed: s.seed,
            query: (before.to_string(), after.to_string()),
            runs: runs.min(MAX_RUNS),
        }
    }
}

#[wasm_bindgen]
impl SimResults {
    /// Add a block message; false when it was refused (a repeat or the wrong shape).
    pub fn add(&mut self, msg: &JsValue) -> Result<bool, JsError> {
        let shares = get(msg, "shares")?
            .dyn_into::<Float64Array>()
            .map(|a| a.to_vec())
            .map_err(|_| JsError::new("the block message's shares is not a Float64Array"))?;
        let block = BlockResult {
            block: get_u32(msg, "block")?,
            runs: get_u32(msg, "runs")?,
            wins: get_u32s(msg, "wins")?,
            tipping: get_u32s(msg, "tipping")?,
            majority: get_u32s(msg, "majority")?,
            seats: get_u32s(msg, "seats")?,
            shares,
        };
        Ok(self.merged.add(block))
    }

    /// Runs asked.
    #[wasm_bindgen(getter)]
    pub fn runs(&self) -> u32 {
        self.runs
    }

    /// Runs merged so far.
    #[wasm_bindgen(js_name = runsDone)]
    pub fn runs_done(&self) -> u32 {
        self.merged.runs_done()
    }

    /// Blocks merged so far (blocks 0 … n − 1).
    #[wasm_bindgen(js_name = blocksDone)]
    pub fn blocks_done(&self) -> u32 {
        self.merged.blocks_done()
    }

    /// Runs won per district: parties + 1 counts each (tied runs last).
    pub fn wins(&self) -> Vec<u32> {
        self.merged.wins().to_vec()
    }

    #[wasm_bindgen(getter)]
    pub fn parties(&self) -> usize {
        self.parties
    }

    fn report(&self) -> crate::analysis::simulate::Report {
        let q = format!(
            "{}runs={}{}",
            self.query.0,
            self.merged.runs_done(),
            self.query.1
        );
        self.merged.report(&self.labels, self.seed, q)
    }

    /// The summary of the runs merged so far, as a plain object (SPEC 4's shape).
    pub fn summary(&self) -> JsValue {
        to_js(&self.report())
    }

    /// The page's view of the runs merged so far (`output::won::SimView`).
    pub fn view(&self) -> JsValue {
        let v = crate::output::won::SimView::of(&self.report(), self.merged.wins(), self.runs);
        to_js(&v)
    }

    /// The JSON of `stratamap simulate` for the runs merged so far (its `scenario` says
    /// `runs=` that many, which reproduces them).
    pub fn json(&self) -> String {
        self.report().to_json()
    }
}

#[wasm_bindgen]
impl SimWorker {
    /// Empty results for this worker's dataset (for tools that merge without an engine,
    /// such as the Node check).
    pub fn results(&self, query: &str, runs: u32) -> SimResults {
        SimResults::for_dataset(&self.ds, query, runs)
    }
}

#[wasm_bindgen]
impl Engine {
    /// Empty results of a simulation of `query` with `runs` runs on this dataset, to
    /// which the workers' blocks are added.
    #[wasm_bindgen(js_name = simResults)]
    pub fn sim_results(&self, query: &str, runs: u32) -> SimResults {
        SimResults::for_dataset(self.inner.dataset(), query, runs)
    }

    /// Per group, what a change the size of its poll's margin of error does to the map
    /// (`analysis::moe_effect`); null without a poll. Slower: call when sliders settle.
    #[wasm_bindgen(js_name = moeEffects)]
    pub fn moe_effects(&self) -> JsValue {
        let e = &self.inner;
        let v = crate::analysis::moe_effect::moe_effects(e.dataset(), e.shifts(), e.tally());
        to_js(&v)
    }
}
