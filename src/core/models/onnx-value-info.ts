/**
 * An ONNX model's declared inputs and outputs as plain data (what onnxruntime's session reports as
 * inputMetadata / outputMetadata), and how messages describe them. Pure: the planners in
 * plan-onnx-inputs.ts and plan-onnx-output.ts read these, never a session.
 */
import type { FeatureInfo } from '../data/dataset.ts'

export type OnnxValueInfo =
  | { readonly name: string; readonly isTensor: true; readonly type: string; readonly shape: ReadonlyArray<number | string> }
  | { readonly name: string; readonly isTensor: false }

export type OnnxTensorInfo = Extract<OnnxValueInfo, { isTensor: true }>

export const isFloatTensor = (value: OnnxValueInfo): value is OnnxTensorInfo =>
  value.isTensor && (value.type === 'float32' || value.type === 'float64')

/** [N, 1], [N], or [N, ?]: one value per row. */
export function isColumnShape(shape: ReadonlyArray<number | string>): boolean {
  if (shape.length === 1) return true
  return shape.length === 2 && (shape[1] === 1 || typeof shape[1] === 'string' || shape[1] < 0)
}

/** `[N, 3]`; a free dimension without a name (onnxruntime reports -1 or '') reads '?'. */
export function describeShape(shape: ReadonlyArray<number | string>): string {
  return `[${shape.map((d) => ((typeof d === 'number' && d < 0) || d === '' ? '?' : String(d))).join(', ')}]`
}

export function describeValues(values: readonly OnnxValueInfo[]): string {
  if (values.length === 0) return '(none)'
  return values.map((v) => (v.isTensor ? `${v.name} (${v.type} ${describeShape(v.shape)})` : `${v.name} (not a tensor)`)).join(', ')
}

export function describeColumns(features: readonly FeatureInfo[]): string {
  if (features.length === 0) return '(none)'
  return features.map((f) => `${f.name} (${f.kind})`).join(', ')
}
