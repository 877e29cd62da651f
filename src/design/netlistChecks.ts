/**
 * Structural checks of a circuit stage's netlist, before any solving: each failure is one line
 * naming the element and the node. A netlist that passes has a DC path from every node to ground,
 * no loop of ideal sources, and feedback around every op-amp, so its nodal equations can be solved.
 */
import { UserError } from '../errors.js';
import { GROUND_NODE, RESERVED_NODES, type CircuitElement, type CircuitStage } from './types.js';

/** Where an element (by index) or, for null, the stage sits in the design file, for messages. */
export type ElementLocator = (elementIndex: number | null) => string;

/** Nodes an element joins by a DC path (a resistance, a junction, a channel). */
function dcConnectedNodes(element: CircuitElement): string[] {
  switch (element.type) {
    case 'capacitor':
      return [];
    case 'opamp':
      return [element.nodes[2], GROUND_NODE]; // the output is an ideal source; the inputs draw no current
    case 'njfet':
    case 'pjfet':
      return [element.nodes[0], element.nodes[2]]; // the square-law gate draws no current
    default:
      return [...element.nodes];
  }
}

class NodeSets {
  private readonly parent = new Map<string, string>();

  find(node: string): string {
    let root = node;
    while (this.parent.has(root) && this.parent.get(root) !== root) root = this.parent.get(root) as string;
    this.parent.set(node, root);
    return root;
  }

  join(a: string, b: string): void {
    this.parent.set(this.find(a), this.find(b));
  }
}

function checkTerminals(stage: CircuitStage, locate: ElementLocator): void {
  const used = new Set(stage.elements.flatMap((element) => element.nodes));
  for (const [role, node] of [['input', stage.input], ['output', stage.output]] as const) {
    if (!used.has(node)) throw new UserError(`${locate(null)}: stage "${stage.id}" ${role} node "${node}" is not connected to any element`);
  }
}

function checkSourceLoops(stage: CircuitStage, locate: ElementLocator): void {
  const driven = new Map<string, string>(); // node -> the op-amp that drives it
  stage.elements.forEach((element, index) => {
    if (element.type !== 'opamp') return;
    const output = element.nodes[2];
    if (RESERVED_NODES.includes(output) || output === stage.input) {
      const what = output === stage.input ? 'the stage input, itself driven by an ideal source' : `"${output}", a fixed voltage`;
      throw new UserError(`${locate(index)}: op-amp "${element.id}" output node "${output}" is ${what}: a loop of voltage sources`);
    }
    const other = driven.get(output);
    if (other !== undefined) throw new UserError(`${locate(index)}: op-amp "${element.id}" output node "${output}" is also driven by op-amp "${other}": a loop of voltage sources`);
    driven.set(output, element.id);
  });
}

function checkDcPaths(stage: CircuitStage, locate: ElementLocator): void {
  const sets = new NodeSets();
  for (const fixed of [...RESERVED_NODES, stage.input]) sets.join(fixed, GROUND_NODE);
  for (const element of stage.elements) {
    const nodes = dcConnectedNodes(element);
    for (let k = 1; k < nodes.length; k++) sets.join(nodes[0], nodes[k]);
  }
  const ground = sets.find(GROUND_NODE);
  stage.elements.forEach((element, index) => {
    for (const node of element.nodes) {
      if (sets.find(node) !== ground) {
        throw new UserError(
          `${locate(index)}: stage "${stage.id}" element "${element.id}": node "${node}" has no DC path to ground (only capacitors or op-amp and JFET inputs reach it; add a resistor to a bias point)`,
        );
      }
    }
  });
}

/** Is there a path of elements from `from` to `to` that avoids fixed-voltage nodes and `skip`? */
function connected(stage: CircuitStage, from: string, to: string, skip: CircuitElement): boolean {
  const fixed = new Set([...RESERVED_NODES, stage.input]);
  const seen = new Set([from]);
  const queue = [from];
  while (queue.length > 0) {
    const node = queue.shift() as string;
    if (node === to) return true;
    if (fixed.has(node) && node !== from) continue;
    for (const element of stage.elements) {
      if (element === skip || !element.nodes.includes(node)) continue;
      for (const next of element.nodes) {
        if (!seen.has(next)) {
          seen.add(next);
          queue.push(next);
        }
      }
    }
  }
  return false;
}

function checkFeedback(stage: CircuitStage, locate: ElementLocator): void {
  stage.elements.forEach((element, index) => {
    if (element.type !== 'opamp') return;
    const [, minus, output] = element.nodes;
    if (!connected(stage, output, minus, element)) {
      throw new UserError(`${locate(index)}: op-amp "${element.id}" has no feedback path from its output "${output}" to its inverting input "${minus}"`);
    }
  });
}

export function validateNetlist(stage: CircuitStage, locate: ElementLocator): void {
  checkTerminals(stage, locate);
  checkSourceLoops(stage, locate);
  checkDcPaths(stage, locate);
  checkFeedback(stage, locate);
}
