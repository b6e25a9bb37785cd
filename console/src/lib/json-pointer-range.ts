import { findNodeAtLocation, parseTree, type Node } from 'jsonc-parser';
import { isPointer, parsePointer } from '@gridwright/shared/json-pointer';

export interface TextRange {
  from: number;
  to: number;
  /** False when the pointer names something absent (e.g. a missing required field): the range is then its nearest parent. */
  exact: boolean;
}

function segmentsFor(node: Node, raw: string[]): (string | number)[] {
  const out: (string | number)[] = [];
  let current: Node | undefined = node;
  for (const seg of raw) {
    const asIndex: string | number = current?.type === 'array' && /^\d+$/.test(seg) ? Number(seg) : seg;
    out.push(asIndex);
    current = current ? findNodeAtLocation(current, [asIndex]) : undefined;
  }
  return out;
}

/**
 * Maps a JSON Pointer from the API onto the editor's text. A property is highlighted with its key,
 * so an error on a value reads as "this field"; a missing target falls back to the deepest parent
 * that exists, so every error still lands somewhere visible.
 */
export function pointerToRange(text: string, pointer: string): TextRange | null {
  const root = parseTree(text);
  if (!root) return null;
  const rootStart = { from: root.offset, to: Math.min(root.offset + 1, root.offset + root.length), exact: false };
  // Text that is not a pointer names nothing in the document, so it lands where a missing field would.
  if (!isPointer(pointer)) return rootStart;
  const path = segmentsFor(root, parsePointer(pointer));
  for (let depth = path.length; depth >= 0; depth--) {
    const node = depth === 0 ? root : findNodeAtLocation(root, path.slice(0, depth));
    if (!node) continue;
    const target = node.parent?.type === 'property' ? node.parent : node;
    const exact = depth === path.length;
    if (!exact && target.type === 'property' && target.children?.[1]?.type === 'object') {
      // A missing field of an object: point at the key of the object that should hold it, not the whole block.
      const key = target.children[0];
      return { from: key.offset, to: key.offset + key.length, exact };
    }
    if (!exact && depth === 0) return rootStart;
    return { from: target.offset, to: target.offset + target.length, exact };
  }
  return null;
}
