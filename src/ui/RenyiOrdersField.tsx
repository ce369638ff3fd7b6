import { MAX_RENYI_ORDERS, parseRenyiOrders, type RenyiOrder } from '@shared/vacuum';
import { TextField } from './Field';

/**
 * The Rényi orders of a run or study as one text field ("0.5, 2, inf"): blank asks for none. Forms read
 * it with `renyiOrdersFromText`, so the run and study forms refuse alike and with the API's words.
 */
export function RenyiOrdersField({ value, onChange, error, name = 'renyi' }: { value: string; onChange(text: string): void; error?: string; name?: string }) {
  return (
    <TextField
      label="Rényi orders α"
      name={name}
      value={value}
      onChange={(e) => onChange(e.target.value)}
      error={error}
      placeholder="e.g. 0.5, 2, inf"
      className="font-mono"
      hint={`S_α beside S for each α > 0, α ≠ 1 (inf: the min-entropy); up to ${MAX_RENYI_ORDERS}, comma-separated; blank for none`}
    />
  );
}

/** The orders in the field's text: undefined when blank, else the parsed list or the message to show. */
export function renyiOrdersFromText(text: string): { orders: RenyiOrder[] | undefined; error?: string } {
  if (text.trim() === '') return { orders: undefined };
  try {
    return { orders: parseRenyiOrders(text) };
  } catch (error) {
    return { orders: undefined, error: (error as Error).message };
  }
}
