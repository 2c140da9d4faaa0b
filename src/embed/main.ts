/**
 * The embed script (`rhosigma-embed.js`, built by webpack.embed.config.cjs): defines the
 * `<rhosigma-calculator>` element, hands it the src/ui components and the page's one engine client.
 * A page includes it once: `<script src=".../rhosigma-embed.js" defer></script>`.
 *
 * One worker per page: the client is made when the first calculator mounts and shared by every one after
 * it. The worker file, the stylesheet and the chunks loaded on first need (the plotting, the worker's
 * expression reader) are found beside this script (webpack's publicPath "auto", from
 * document.currentScript; in the worker, from the worker's own address), the only files the embed ever
 * requests.
 *
 * What it does not do: read the page (each element reads only itself), or compute. Cost: the bundle's load.
 */
import { EngineClient } from '../worker/client.js';
import { StateEditor } from '../ui/state-editor.js';
import { DivergenceCalculator } from '../ui/divergence-calculator.js';
import { RecoverabilityCalculator } from '../ui/recoverability-calculator.js';
import { GuessingCalculator } from '../ui/guessing-calculator.js';
import { OneShotCalculator } from '../ui/one-shot-calculator.js';
import { defineCalculatorElement, setEmbedEnvironment } from './element.js';
import { setUiKit, type CalculatorComponent, type ComponentClass } from './mount.js';

const script = document.currentScript as HTMLScriptElement | null;
const base = new URL('.', script?.src || location.href);

let engine: EngineClient | null = null;

setEmbedEnvironment({
  stylesheet: new URL('rhosigma-embed.css', base).href,
  engine: () => (engine ??= new EngineClient()),
});
const calculator = (c: unknown) => c as ComponentClass<CalculatorComponent>;
setUiKit({
  StateEditor: StateEditor as unknown as ComponentClass,
  calculators: {
    divergence: calculator(DivergenceCalculator),
    recoverability: calculator(RecoverabilityCalculator),
    guessing: calculator(GuessingCalculator),
    'one-shot': calculator(OneShotCalculator),
  },
});
defineCalculatorElement();
