/**
 * Writes a feed-forward network as an ONNX model (opset 13, standard operators only, so any
 * onnxruntime runs it): convolutions, ReLU, 2x2 max pooling, flatten, dense layers (Gemm),
 * softmax or sigmoid. The training script exports the shipped classifier with it and `learn`
 * exports a deployment's model with it. The protobuf messages come from the ONNX project's own
 * definitions (npm onnx-proto, generated from onnx.proto of ONNX 1.10).
 *
 * Operator semantics as the ONNX operator documentation gives them (opset 13): Conv with
 * weights [out, in, kh, kw] and `pads` [top, left, bottom, right]; MaxPool with kernel_shape and
 * strides; Gemm Y = A B^T + C with transB = 1 and weights [out, in]; Softmax over axis 1.
 */
import onnxProto from 'onnx-proto';
import { invalidArgument } from '../shared/errors.js';

const { onnx } = onnxProto;

export type Layer =
  | { op: 'conv'; weights: Float32Array; bias: Float32Array; out: number; in: number; kernel: number; pad: number }
  | { op: 'relu' }
  | { op: 'maxpool2' }
  | { op: 'flatten' }
  | { op: 'dense'; weights: Float32Array; bias: Float32Array; out: number; in: number }
  | { op: 'softmax' }
  | { op: 'sigmoid' };

export interface GraphSpec {
  name: string;
  inputName: string;
  /** Input shape with the batch axis first; a string names a symbolic (free) dimension. */
  inputShape: Array<number | string>;
  outputName: string;
  /** Output shape, batch axis first. */
  outputShape: Array<number | string>;
  layers: readonly Layer[];
  /** Free-text pairs stored in the model (what it was trained on, by what). */
  metadata?: Record<string, string>;
}

const dims = (shape: Array<number | string>) => ({ dim: shape.map((d) => (typeof d === 'number' ? { dimValue: d } : { dimParam: d })) });
const floatInfo = (name: string, shape: Array<number | string>) => onnx.ValueInfoProto.create({ name, type: { tensorType: { elemType: onnx.TensorProto.DataType.FLOAT, shape: dims(shape) } } });
const ints = (name: string, v: number[]) => onnx.AttributeProto.create({ name, type: onnx.AttributeProto.AttributeType.INTS, ints: v });
const int = (name: string, v: number) => onnx.AttributeProto.create({ name, type: onnx.AttributeProto.AttributeType.INT, i: v });

function tensor(name: string, shape: number[], data: Float32Array): onnxProto.onnx.ITensorProto {
  const n = shape.reduce((a, b) => a * b, 1);
  if (data.length !== n) throw invalidArgument(`${name}.length`, String(n), data.length);
  // raw_data is little-endian float32 (onnx.proto); a copy so the caller's buffer's offset does not matter.
  const raw = new Uint8Array(new Float32Array(data).buffer);
  return onnx.TensorProto.create({ name, dims: shape, dataType: onnx.TensorProto.DataType.FLOAT, rawData: raw });
}

/** The serialised model (bytes of an .onnx file). */
export function writeOnnx(spec: GraphSpec): Uint8Array {
  const nodes: onnxProto.onnx.INodeProto[] = [];
  const inits: onnxProto.onnx.ITensorProto[] = [];
  let current = spec.inputName;
  spec.layers.forEach((l, i) => {
    const last = i === spec.layers.length - 1;
    const out = last ? spec.outputName : `t${i}`;
    switch (l.op) {
      case 'conv':
        inits.push(tensor(`conv${i}.w`, [l.out, l.in, l.kernel, l.kernel], l.weights), tensor(`conv${i}.b`, [l.out], l.bias));
        nodes.push(onnx.NodeProto.create({ opType: 'Conv', name: `conv${i}`, input: [current, `conv${i}.w`, `conv${i}.b`], output: [out], attribute: [ints('kernel_shape', [l.kernel, l.kernel]), ints('pads', [l.pad, l.pad, l.pad, l.pad]), ints('strides', [1, 1])] }));
        break;
      case 'relu':
        nodes.push(onnx.NodeProto.create({ opType: 'Relu', name: `relu${i}`, input: [current], output: [out] }));
        break;
      case 'maxpool2':
        nodes.push(onnx.NodeProto.create({ opType: 'MaxPool', name: `pool${i}`, input: [current], output: [out], attribute: [ints('kernel_shape', [2, 2]), ints('strides', [2, 2])] }));
        break;
      case 'flatten':
        nodes.push(onnx.NodeProto.create({ opType: 'Flatten', name: `flatten${i}`, input: [current], output: [out], attribute: [int('axis', 1)] }));
        break;
      case 'dense':
        inits.push(tensor(`dense${i}.w`, [l.out, l.in], l.weights), tensor(`dense${i}.b`, [l.out], l.bias));
        nodes.push(onnx.NodeProto.create({ opType: 'Gemm', name: `dense${i}`, input: [current, `dense${i}.w`, `dense${i}.b`], output: [out], attribute: [int('transB', 1)] }));
        break;
      case 'softmax':
        nodes.push(onnx.NodeProto.create({ opType: 'Softmax', name: `softmax${i}`, input: [current], output: [out], attribute: [int('axis', 1)] }));
        break;
      case 'sigmoid':
        nodes.push(onnx.NodeProto.create({ opType: 'Sigmoid', name: `sigmoid${i}`, input: [current], output: [out] }));
        break;
    }
    current = out;
  });
  if (!spec.layers.length) throw invalidArgument('layers', 'at least one layer', 0);
  const model = onnx.ModelProto.create({
    // IR version 7 goes with opset 13 (ONNX's versioning table).
    irVersion: 7,
    opsetImport: [{ domain: '', version: 13 }],
    producerName: 'movesift',
    graph: onnx.GraphProto.create({ name: spec.name, node: nodes, initializer: inits, input: [floatInfo(spec.inputName, spec.inputShape)], output: [floatInfo(spec.outputName, spec.outputShape)] }),
    metadataProps: Object.entries(spec.metadata ?? {}).map(([key, value]) => ({ key, value })),
  });
  return onnx.ModelProto.encode(model).finish();
}
