import { onnxProto } from './onnx-proto.ts'

/** What loadOnnxModel needs from a model file beyond what onnxruntime's session exposes. */
export interface OnnxSummary {
  /** ModelProto.metadata_props, key to value. */
  readonly metadata: ReadonlyMap<string, string>
  /** Class labels declared by ai.onnx.ml nodes (classlabels_strings / classlabels_int64s), keyed by each output name of the declaring node. */
  readonly classLabelsByOutput: ReadonlyMap<string, readonly (string | number)[]>
  /** Every distinct declared label list, in graph order (to fall back on when exactly one exists). */
  readonly classLabelSets: readonly (readonly (string | number)[])[]
}

interface NodeSummary {
  output?: string[]
  opType?: string
  domain?: string
  attribute?: Array<{ name?: string; ints?: number[]; strings?: Uint8Array[] }>
}

/**
 * Reads metadata_props and declared class labels from .onnx bytes. onnxruntime-node's session does
 * not expose either. Uses the `onnx.ModelSummary` view, which skips initializers and float
 * payloads, so the cost is one pass over the node headers. Throws protobufjs's error on bytes that
 * are not a ModelProto (call it after onnxruntime has accepted the file).
 */
export function readOnnxSummary(bytes: Uint8Array): OnnxSummary {
  const decoded = onnxProto.ModelSummary.toObject(onnxProto.ModelSummary.decode(bytes), {
    longs: Number,
    arrays: true,
  }) as { metadataProps: Array<{ key?: string; value?: string }>; graph?: { node?: NodeSummary[] } }
  const metadata = new Map<string, string>()
  for (const entry of decoded.metadataProps) metadata.set(entry.key ?? '', entry.value ?? '')

  const classLabelsByOutput = new Map<string, readonly (string | number)[]>()
  const classLabelSets: (readonly (string | number)[])[] = []
  const text = new TextDecoder()
  for (const node of decoded.graph?.node ?? []) {
    if (node.domain !== 'ai.onnx.ml') continue
    let labels: readonly (string | number)[] | undefined
    for (const attribute of node.attribute ?? []) {
      if (attribute.name === 'classlabels_strings') labels = (attribute.strings ?? []).map((s) => text.decode(s))
      if (attribute.name === 'classlabels_int64s') labels = attribute.ints ?? []
    }
    if (!labels) continue
    for (const output of node.output ?? []) classLabelsByOutput.set(output, labels)
    if (!classLabelSets.some((seen) => seen.length === labels.length && seen.every((l, i) => l === labels[i]))) {
      classLabelSets.push(labels)
    }
  }
  return { metadata, classLabelsByOutput, classLabelSets }
}
