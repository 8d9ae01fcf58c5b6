/**
 * The part of the ONNX protobuf schema that plumbline writes and reads, as a protobufjs JSON
 * descriptor. Field numbers and types are those of onnx/onnx `onnx/onnx.proto` (proto2, package
 * `onnx`); field names are that file's, in camelCase as protobufjs uses them. Only what exportOnnx
 * writes and loadOnnxModel reads is listed; a decoder skips every other field, so models from any
 * producer still decode.
 *
 * Two views of ModelProto share the field numbers:
 * - `onnx.ModelProto` and what it nests: enough to write a model (graph, initializers, attributes).
 * - `onnx.ModelSummary`: metadata_props and the graph's nodes with their string/int list
 *   attributes only. Reading it skips initializers and float payloads as opaque length-delimited
 *   fields, so reading the summary of a large model costs little beyond the node headers.
 */
import protobuf from 'protobufjs'

/**
 * Our metadata_props key naming the column order of a model's single [N, F] input, as a JSON array
 * of column names. exportOnnx writes it; loadOnnxModel reads it.
 */
export const FEATURES_METADATA_KEY = 'plumbline.features'

/** TensorProto.DataType values used here (onnx.proto). */
export const OnnxDataType = { FLOAT: 1, INT64: 7, STRING: 8, DOUBLE: 11 } as const

/** AttributeProto.AttributeType values used here (onnx.proto). */
export const OnnxAttributeType = { FLOAT: 1, INT: 2, STRING: 3, TENSOR: 4, FLOATS: 6, INTS: 7, STRINGS: 8 } as const

const repeated = (type: string, id: number) => ({ rule: 'repeated', type, id })
const optional = (type: string, id: number) => ({ type, id })

const descriptor = {
  nested: {
    onnx: {
      nested: {
        ModelProto: {
          fields: {
            irVersion: optional('int64', 1),
            producerName: optional('string', 2),
            producerVersion: optional('string', 3),
            docString: optional('string', 6),
            graph: optional('GraphProto', 7),
            opsetImport: repeated('OperatorSetIdProto', 8),
            metadataProps: repeated('StringStringEntryProto', 14),
          },
        },
        OperatorSetIdProto: { fields: { domain: optional('string', 1), version: optional('int64', 2) } },
        StringStringEntryProto: { fields: { key: optional('string', 1), value: optional('string', 2) } },
        GraphProto: {
          fields: {
            node: repeated('NodeProto', 1),
            name: optional('string', 2),
            initializer: repeated('TensorProto', 5),
            docString: optional('string', 10),
            input: repeated('ValueInfoProto', 11),
            output: repeated('ValueInfoProto', 12),
          },
        },
        NodeProto: {
          fields: {
            input: repeated('string', 1),
            output: repeated('string', 2),
            name: optional('string', 3),
            opType: optional('string', 4),
            attribute: repeated('AttributeProto', 5),
            docString: optional('string', 6),
            domain: optional('string', 7),
          },
        },
        AttributeProto: {
          fields: {
            name: optional('string', 1),
            f: optional('float', 2),
            i: optional('int64', 3),
            s: optional('bytes', 4),
            t: optional('TensorProto', 5),
            floats: repeated('float', 7),
            ints: repeated('int64', 8),
            strings: repeated('bytes', 9),
            type: optional('int32', 20),
          },
        },
        TensorProto: {
          fields: {
            dims: repeated('int64', 1),
            dataType: optional('int32', 2),
            floatData: repeated('float', 4),
            int64Data: repeated('int64', 7),
            name: optional('string', 8),
            rawData: optional('bytes', 9),
            doubleData: repeated('double', 10),
          },
        },
        ValueInfoProto: { fields: { name: optional('string', 1), type: optional('TypeProto', 2) } },
        TypeProto: {
          fields: { tensorType: optional('TypeProtoTensor', 1) },
        },
        TypeProtoTensor: {
          fields: { elemType: optional('int32', 1), shape: optional('TensorShapeProto', 2) },
        },
        TensorShapeProto: { fields: { dim: repeated('TensorShapeDimension', 1) } },
        TensorShapeDimension: {
          oneofs: { value: { oneof: ['dimValue', 'dimParam'] } },
          fields: { dimValue: optional('int64', 1), dimParam: optional('string', 2) },
        },

        ModelSummary: {
          fields: { graph: optional('GraphSummary', 7), metadataProps: repeated('StringStringEntryProto', 14) },
        },
        GraphSummary: { fields: { node: repeated('NodeSummary', 1) } },
        NodeSummary: {
          fields: {
            output: repeated('string', 2),
            opType: optional('string', 4),
            attribute: repeated('AttributeSummary', 5),
            domain: optional('string', 7),
          },
        },
        AttributeSummary: {
          fields: { name: optional('string', 1), ints: repeated('int64', 8), strings: repeated('bytes', 9) },
        },
      },
    },
  },
}

const root = protobuf.Root.fromJSON(descriptor)

/** protobufjs message types for the schema above. */
export const onnxProto = {
  ModelProto: root.lookupType('onnx.ModelProto'),
  ModelSummary: root.lookupType('onnx.ModelSummary'),
} as const

// Plain-object shapes for writing (protobufjs `fromObject` input). int64 fields take numbers.

export interface OnnxTensor {
  name: string
  dims: number[]
  dataType: number
  floatData?: number[]
  doubleData?: number[]
  int64Data?: number[]
}

export interface OnnxAttribute {
  name: string
  type: number
  f?: number
  i?: number
  s?: Uint8Array
  t?: OnnxTensor
  floats?: number[]
  ints?: number[]
  strings?: Uint8Array[]
}

export interface OnnxNode {
  input: string[]
  output: string[]
  name?: string
  opType: string
  domain?: string
  attribute?: OnnxAttribute[]
}

export interface OnnxValueInfo {
  name: string
  type: { tensorType: { elemType: number; shape: { dim: Array<{ dimValue: number } | { dimParam: string }> } } }
}

export interface OnnxModel {
  irVersion: number
  producerName: string
  producerVersion?: string
  docString?: string
  opsetImport: Array<{ domain: string; version: number }>
  metadataProps?: Array<{ key: string; value: string }>
  graph: {
    name: string
    node: OnnxNode[]
    initializer?: OnnxTensor[]
    input: OnnxValueInfo[]
    output: OnnxValueInfo[]
  }
}

/** Serializes a model object to .onnx bytes. */
export function encodeOnnxModel(model: OnnxModel): Uint8Array {
  const type = onnxProto.ModelProto
  return type.encode(type.fromObject(model)).finish()
}
