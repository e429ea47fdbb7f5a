//! The WebAssembly facade: a long-lived [`Engine`](crate::facade::engine::Engine) handle for the
//! page. JavaScript hands it the dataset's texts once, then moves sliders with small
//! calls and reads results as typed arrays and small objects (see DEVELOPERS.md).

use crate::dataset::{manifest_files, Dataset, Sources};
use crate::facade::engine;
use serde::Serialize;
use wasm_bindgen::prelude::*;

fn to_js<T: Serialize + ?Sized>(v: &T) -> JsValue {
    v.serialize(&serde_wasm_bindgen::Serializer::json_compatible())
        .unwrap_or(JsValue::NULL)
}

fn group(index: i32) -> Option<usize> {
    usize::try_from(index).ok()
}

thread_local! {
    static LAST_PANIC: std::cell::RefCell<Option<String>> = const { std::cell::RefCell::new(None) };
}

/// Installs a panic hook that logs to the console and keeps the message, so the page
/// can show it (a panic would be a bug: user input is meant never to cause one).
#[wasm_bindgen(start)]
pub fn start() {
    std::panic::set_hook(Box::new(|info| {
        LAST_PANIC.with(|p| *p.borrow_mut() = Some(info.to_string()));
        console_error_panic_hook::hook(info);
    }));
}

/// The message of the last panic, if the engine ever panicked (it is then unusable:
/// the page should say so and offer a reload).
#[wasm_bindgen(js_name = lastPanic)]
pub fn last_panic() -> Option<String> {
    LAST_PANIC.with(|p| p.borrow().clone())
}

/// The files a manifest names: `{districts, electorate, poll}`.
#[wasm_bindgen(js_name = manifestFiles)]
pub fn manifest_files_js(manifest: &str) -> Result<JsValue, JsError> {
    manifest_files(manifest)
        .map(|f| to_js(&f))
        .map_err(|e| JsError::new(&e.to_string()))
}

#[wasm_bindgen]
pub struct Engine {
    pub(crate) inner: engine::Engine,
}

#[derive(Serialize)]
struct PartyInfo<'a> {
    id: &'a str,
    name: &'a str,
    color: &'a str,
}

#[derive(Serialize)]
struct GroupPoll {
    sample_size: f64,
    design_effect: f64,
    margin_moe: f64,
}

#[derive(Serialize)]
struct GroupInfo<'a> {
    id: &'a str,
    name: &'a str,
    poll: Option<GroupPoll>,
}

#[derive(Serialize)]
struct DistrictInfo<'a> {
    id: &'a str,
    name: &'a str,
    seats: u32,
    region: Option<&'a str>,
}

#[derive(Serialize)]
struct PresetInfo<'a> {
    name: &'a str,
    scenario: &'a str,
}

#[derive(Serialize)]
struct StepInfo {
    label: String,
}

#[derive(Serialize)]
struct Info<'a> {
    title: &'a str,
    source: &'a str,
    parties: Vec<PartyInfo<'a>>,
    axis: [usize; 2],
    groups: Vec<GroupInfo<'a>>,
    districts: Vec<DistrictInfo<'a>>,
    majority: u32,
    total_seats: u64,
    has_poll: bool,
    presets: Vec<PresetInfo<'a>>,
    steps: Vec<StepInfo>,
    caution: &'a str,
}

#[wasm_bindgen]
impl Engine {
    /// Validate the dataset's texts and build the engine (and its map) once.
    #[wasm_bindgen(constructor)]
    pub fn new(
        manifest: &str,
        districts: &str,
        electorate: &str,
        poll: Option<String>,
    ) -> Result<Engine, JsError> {
        let ds = Dataset::from_sources(&Sources {
            manifest,
            districts,
            electorate,
            poll: poll.as_deref(),
        })
        .map_err(|e| JsError::new(&e.to_string()))?;
        Ok(Engine {
            inner: engine::Engine::new(ds),
        })
    }

    pub fn info(&self) -> JsValue {
        let ds = self.inner.dataset();
        let moes = crate::analysis::moe::poll_margin_moe(ds);
        let info = Info {
            title: &ds.title,
            source: &ds.source,
            parties: ds
                .parties
                .iter()
                .map(|p| PartyInfo {
                    id: &p.id,
                    name: &p.name,
                    color: &p.color,
                })
                .collect(),
            axis: ds.axis,
            groups: ds
                .groups
                .iter()
                .enumerate()
                .map(|(g, gr)| GroupInfo {
                    id: &gr.id,
                    name: &gr.name,
                    poll: ds.poll.as_ref().zip(moes.as_ref()).map(|(p, m)| GroupPoll {
                        sample_size: p.sample_size[g],
                        design_effect: p.design_effect[g],
                        margin_moe: m[g],
                    }),
                })
                .collect(),
            districts: ds
                .districts
                .iter()
                .map(|d| DistrictInfo {
                    id: &d.id,
                    name: &d.name,
                    seats: d.seats,
                    region: d.region.as_deref(),
                })
                .collect(),
            majority: ds.majority,
            total_seats: ds.total_seats(),
            has_poll: ds.poll.is_some(),
            presets: ds
                .presets
                .iter()
                .map(|p| PresetInfo {
                    name: &p.name,
                    scenario: &p.scenario,
                })
                .collect(),
            steps: crate::output::shading::step_labels()
                .into_iter()
                .map(|label| StepInfo { label })
                .collect(),
            caution: crate::CAUTION,
        };
        to_js(&info)
    }

    #[wasm_bindgen(js_name = mapSvg)]
    pub fn map_svg(&self) -> String {
        self.inner.map_svg()
    }

    /// A point inside each district, `[x0, y0, x1, y1, …]` in SVG units.
    pub fn anchors(&self) -> Vec<f64> {
        self.inner
            .layout()
            .anchors
            .iter()
            .flat_map(|(x, y)| [*x, *y])
            .collect()
    }

    pub fn palette(&self) -> JsValue {
        to_js(&crate::output::shading::palette(self.inner.dataset()))
    }

    /// Apply a scenario string; returns the problems `[{key, message}]`.
    #[wasm_bindgen(js_name = setScenario)]
    pub fn set_scenario(&mut self, query: &str) -> JsValue {
        to_js(&self.inner.set_scenario(query))
    }

    /// Group index, or -1 for all groups.
    #[wasm_bindgen(js_name = setTurnout)]
    pub fn set_turnout(&mut self, group_index: i32, points: f64) {
        self.inner.set_turnout(group(group_index), points);
    }

    #[wasm_bindgen(js_name = setMargin)]
    pub fn set_margin(&mut self, group_index: i32, points: f64) {
        self.inner.set_margin(group(group_index), points);
    }

    #[wasm_bindgen(js_name = setStart)]
    pub fn set_start(&mut self, from_poll: bool) {
        self.inner.set_start(from_poll);
    }

    #[wasm_bindgen(js_name = scenarioQuery)]
    pub fn scenario_query(&self) -> String {
        self.inner.scenario_query()
    }

    pub fn scenario(&self) -> JsValue {
        to_js(self.inner.scenario())
    }

    pub fn fills(&self) -> Vec<u16> {
        self.inner.fills()
    }

    /// Winning party per district, -1 for a tie.
    pub fn winners(&self) -> Vec<i16> {
        self.inner
            .tally()
            .winner
            .iter()
            .map(|w| w.map_or(-1, |k| k as i16))
            .collect()
    }

    pub fn margins(&self) -> Vec<f64> {
        self.inner.tally().margin.clone()
    }

    pub fn summary(&self) -> JsValue {
        to_js(&self.inner.summary())
    }

    pub fn district(&self, index: usize) -> JsValue {
        match self.inner.district(index) {
            Some(d) => to_js(&d),
            None => JsValue::NULL,
        }
    }

    pub fn curve(&self) -> JsValue {
        to_js(&self.inner.curve())
    }

    pub fn plane(&self) -> JsValue {
        to_js(&self.inner.plane())
    }

    #[wasm_bindgen(js_name = tallyCsv)]
    pub fn tally_csv(&self) -> String {
        self.inner.tally_csv()
    }

    /// The map as a standalone SVG document (title, legend, source, caution).
    #[wasm_bindgen(js_name = renderSvg)]
    pub fn render_svg(&self) -> String {
        self.inner.render_svg()
    }

    /// What it would take (SPEC 2.5): `[{group (index, -1 for all), party, outcome,
    /// turnout: {change, value} | null, margin: {change, value} | null, sentence}]`.
    /// Slower than a tally (a few hundred tallies): call when the sliders settle.
    #[wasm_bindgen(js_name = whatItTakes)]
    pub fn what_it_takes(&self) -> JsValue {
        to_js(&self.inner.what_it_takes_view())
    }

    /// [`Self::what_it_takes`] for one group (index; -1: all groups together), a few
    /// tens of milliseconds, so the page can spread the work over several tasks.
    #[wasm_bindgen(js_name = whatItTakesGroup)]
    pub fn what_it_takes_group(&self, group_index: i32) -> JsValue {
        to_js(&self.inner.what_it_takes_group(group(group_index)))
    }

    #[wasm_bindgen(js_name = whatItTakesCsv)]
    pub fn what_it_takes_csv(&self) -> String {
        self.inner.what_it_takes_csv()
    }

    /// CSV on the Web metadata for the tally's CSV saved as `csvUrl`.
    #[wasm_bindgen(js_name = tallyCsvw)]
    pub fn tally_csvw(&self, csv_url: &str) -> String {
        self.inner.tally_csvw(csv_url)
    }

    /// The scenario as JSON, with the page's share link.
    #[wasm_bindgen(js_name = scenarioJson)]
    pub fn scenario_json(&self, link: Option<String>) -> String {
        self.inner.scenario_json(link.as_deref())
    }

    /// The scenario in sentences, and the fixed lines a reader needs:
    /// `{scenario: [..], start, lead, tipping}`.
    pub fn words(&self) -> JsValue {
        to_js(&self.inner.words())
    }
}
