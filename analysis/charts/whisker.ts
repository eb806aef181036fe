import type { SKRSContext2D } from '@napi-rs/canvas';

/** An interval drawn as a line with end caps; `vertical` runs along y. */
export function drawWhisker(
  ctx: SKRSContext2D,
  at: number,
  from: number,
  to: number,
  cap: number,
  vertical: boolean,
  colour: string,
  lineWidth: number,
): void {
  ctx.save();
  ctx.strokeStyle = colour;
  ctx.lineWidth = lineWidth;
  ctx.lineCap = 'butt';
  ctx.beginPath();
  if (vertical) {
    ctx.moveTo(at, from);
    ctx.lineTo(at, to);
    ctx.moveTo(at - cap / 2, from);
    ctx.lineTo(at + cap / 2, from);
    ctx.moveTo(at - cap / 2, to);
    ctx.lineTo(at + cap / 2, to);
  } else {
    ctx.moveTo(from, at);
    ctx.lineTo(to, at);
    ctx.moveTo(from, at - cap / 2);
    ctx.lineTo(from, at + cap / 2);
    ctx.moveTo(to, at - cap / 2);
    ctx.lineTo(to, at + cap / 2);
  }
  ctx.stroke();
  ctx.restore();
}
