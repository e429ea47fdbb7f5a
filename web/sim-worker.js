// A simulation worker: holds its own engine instance with the dataset parsed once, and
// runs the blocks the page hands it. The block loop and the block messages are the
// engine's (SimWorker.runBlocks posts each block's counts as typed arrays); this file
// only queues batches and drops those of an old generation.
//
// Messages in:  {type: 'dataset', manifest, districts, electorate, poll}
//               {type: 'run', generation, scenario, runs, first, count}
//               {type: 'stop', generation}
// Messages out: {type: 'ready'}, block messages (see the engine), {type: 'batch',
//               generation, first, count} after each batch, {type: 'error', message}.
import init, { SimWorker } from './pkg/stratamap.js';

const ready = init();
let sim = null;
let generation = -1;
let queue = [];
let scheduled = false;

// A zero-delay turn of the event loop between batches, so that a newer generation's
// message is read before the next stale batch would start.
const channel = new MessageChannel();
channel.port1.onmessage = step;

function fail(e) {
  self.postMessage({ type: 'error', message: String((e && e.message) || e) });
}

function kick() {
  if (!scheduled && queue.length) {
    scheduled = true;
    channel.port2.postMessage(0);
  }
}

function step() {
  scheduled = false;
  const job = queue.shift();
  if (!job || !sim) return;
  try {
    sim.runBlocks(job.generation, job.first, job.count);
    self.postMessage({ type: 'batch', generation: job.generation, first: job.first, count: job.count });
  } catch (e) {
    fail(e);
  }
  kick();
}

self.onmessage = async (event) => {
  const m = event.data;
  try {
    await ready;
    if (m.type === 'dataset') {
      if (sim) sim.free();
      sim = null;
      queue = [];
      generation = -1;
      sim = new SimWorker(m.manifest, m.districts, m.electorate, m.poll ?? undefined);
      self.postMessage({ type: 'ready' });
    } else if (m.type === 'run') {
      if (!sim) return;
      if (m.generation !== generation) {
        generation = m.generation;
        queue = [];
        sim.setScenario(m.scenario, m.runs);
      }
      queue.push({ generation, first: m.first, count: m.count });
      kick();
    } else if (m.type === 'stop') {
      generation = m.generation;
      queue = [];
    }
  } catch (e) {
    fail(e);
  }
};
