// The simulation's workers on the page: one per core (navigator.hardwareConcurrency,
// 1 to 8), each with its own engine instance and the dataset parsed once. The pool
// hands out blocks in small batches, merges what comes back through a results object
// that the engine's owner made (engine.simResults), and drops blocks of an old
// generation: a changed scenario starts a new generation and never mixes with the old.
// It holds no engine and does no arithmetic of its own.

/** Workers to start: one per core, at least 1, at most 8 (a page may set STRATAMAP_WORKERS). */
export function workerCount() {
  const asked = Number(globalThis.STRATAMAP_WORKERS);
  const n = Number.isInteger(asked) && asked > 0 ? asked : navigator.hardwareConcurrency || 1;
  return Math.max(1, Math.min(8, n));
}

/** Blocks per batch: about 50 ms of work each, so a restart waits little. */
function batchFor(cells) {
  if (!cells) return 2;
  return Math.max(1, Math.min(8, Math.round(150000 / cells)));
}

const UPDATE_MS = 100;

export class SimulationPool {
  /**
   * @param {object} hooks
   *   onProgress(results, done): results fill in (called at most every UPDATE_MS and at the end)
   *   onState(state): 'idle' | 'running' | 'done'
   *   onError(message)
   */
  constructor({ onProgress, onState, onError }) {
    this.onProgress = onProgress;
    this.onState = onState;
    this.onError = onError;
    this.workers = [];
    this.generation = 0;
    this.results = null;
    this.state = 'idle';
    this.pending = null;
    this.updateTimer = null;
  }

  /** New dataset texts: restart the workers with it (they parse it once each). */
  setDataset(texts, cells) {
    this.stop();
    for (const w of this.workers) w.worker.terminate();
    this.batch = batchFor(cells);
    this.workers = [];
    const count = workerCount();
    for (let i = 0; i < count; i++) {
      const worker = new Worker(new URL('./sim-worker.js', import.meta.url), { type: 'module' });
      const entry = { worker, ready: false };
      worker.onmessage = (e) => this.#message(entry, e.data);
      worker.onerror = (e) => this.onError?.(String(e.message || 'a simulation worker failed'));
      worker.postMessage({ type: 'dataset', ...texts });
      this.workers.push(entry);
    }
  }

  get workerTotal() {
    return this.workers.length;
  }

  /**
   * Start a simulation; `results` is the engine's empty results for this scenario and
   * these runs (the pool frees it when it is replaced).
   */
  start(results, scenario, runs) {
    this.#drop();
    this.generation += 1;
    this.results = results;
    this.job = { scenario, runs, blocks: Math.ceil(runs / 250), next: 0 };
    if (runs <= 0) {
      this.#setState('idle');
      return;
    }
    this.#setState('running');
    for (const w of this.workers) {
      if (w.ready) this.#feed(w, 2);
    }
  }

  /** Stop: keep what has been merged, hand out nothing more. */
  stop() {
    if (this.state !== 'running') return;
    this.generation += 1;
    for (const w of this.workers) w.worker.postMessage({ type: 'stop', generation: this.generation });
    this.#flush();
    this.#setState('idle');
  }

  #drop() {
    clearTimeout(this.updateTimer);
    this.updateTimer = null;
    if (this.results) this.results.free();
    this.results = null;
  }

  #setState(s) {
    this.state = s;
    this.onState?.(s);
  }

  #feed(w, batches) {
    const job = this.job;
    if (!job || this.state !== 'running') return;
    for (let i = 0; i < batches && job.next < job.blocks; i++) {
      const count = Math.min(this.batch, job.blocks - job.next);
      w.worker.postMessage({
        type: 'run',
        generation: this.generation,
        scenario: job.scenario,
        runs: job.runs,
        first: job.next,
        count,
      });
      job.next += count;
    }
  }

  #message(w, m) {
    if (m.type === 'ready') {
      w.ready = true;
      if (this.state === 'running') this.#feed(w, 2);
    } else if (m.type === 'error') {
      this.onError?.(m.message);
    } else if (m.generation !== this.generation || !this.results) {
      // A block or batch of an old generation: dropped.
    } else if (m.type === 'block') {
      this.results.add(m);
      if (this.results.runsDone() >= this.job.runs) {
        this.#flush();
        this.#setState('done');
      } else if (!this.updateTimer) {
        this.updateTimer = setTimeout(() => this.#flush(), UPDATE_MS);
      }
    } else if (m.type === 'batch') {
      this.#feed(w, 1);
    }
  }

  #flush() {
    clearTimeout(this.updateTimer);
    this.updateTimer = null;
    if (this.results) this.onProgress?.(this.results, this.results.runsDone() >= (this.job?.runs ?? 0));
  }
}
