/**
 * What every model of the widget set shares: the module fields of `defaults()` (docs/surfaces.md), and
 * the schema's defaults (schema.ts) for the model's own fields.
 *
 * Deliberately not here: views and computing (calculator.ts). Cost: none.
 */
import { DOMWidgetModel, unpack_models, type ISerializers } from '@jupyter-widgets/base';
import { packedSerializers } from './buffers.js';
import { MODELS, type ModelName } from './schema.js';
import { MODULE_NAME, MODULE_VERSION } from './version.js';

export function defaultsOf(name: ModelName, base: Record<string, unknown>): Record<string, unknown> {
  const spec = MODELS[name];
  return {
    ...base,
    _model_name: name,
    _model_module: MODULE_NAME,
    _model_module_version: MODULE_VERSION,
    _view_name: spec.view,
    _view_module: MODULE_NAME,
    _view_module_version: MODULE_VERSION,
    ...structuredClone(spec.defaults),
  };
}

/** The fields that may hold matrices in the packed form: they travel as binary buffers (buffers.ts). */
export const PACKED_FIELDS = ['matrix', 'ket', 'kraus', 'choi', 'request', 'result'] as const;

/** Serializers for the fields that hold widgets by reference ("IPY_MODEL_<id>" ↔ the model), and for
 * the fields whose packed matrices travel as binary buffers. */
export function referenceSerializers(name: ModelName): ISerializers {
  const own = PACKED_FIELDS.filter((f) => f in MODELS[name].defaults);
  const out: ISerializers = { ...DOMWidgetModel.serializers, ...packedSerializers(own) };
  for (const field of MODELS[name].references) out[field] = { deserialize: unpack_models as never };
  return out;
}
