/**
 * The fields of a widget held by reference (a deserialized model, docs/surfaces.md), as the plain fields
 * the request rules take; null while the reference is unset.
 *
 * Deliberately not here: anything else. Cost: a copy of the editor's attributes.
 */
import type { WidgetModel } from '@jupyter-widgets/base';
import type { FieldValue } from './schema.js';
import type { Fields } from './requests.js';

export function stateFieldsOf(ref: FieldValue | WidgetModel | undefined): Fields | null {
  if (!ref || typeof ref !== 'object' || !('attributes' in ref)) return null;
  return { ...((ref as WidgetModel).attributes as Fields) };
}
