// Printable export of a plot: the chart as drawn, without the zoom slider
// (ECharts leaves components out of the image on request), under a title
// band that names the scene and the plot. Labels and legends are part of
// the chart's own option, so they come with it.

const bandPx = 64; // title band height at pixel ratio 1

// printablePNG returns a PNG data URL of chart with a title band.
export async function printablePNG(chart, { title, subtitle, pixelRatio = 2 }) {
  const url = chart.getDataURL({ type: 'png', pixelRatio, backgroundColor: '#ffffff', excludeComponents: ['dataZoom', 'toolbox'] });
  const img = new Image();
  img.src = url;
  await img.decode();
  const canvas = document.createElement('canvas');
  canvas.width = img.width;
  canvas.height = img.height + bandPx * pixelRatio;
  const g = canvas.getContext('2d');
  g.fillStyle = '#ffffff';
  g.fillRect(0, 0, canvas.width, canvas.height);
  g.scale(pixelRatio, pixelRatio);
  // A long name on a narrow plot takes a smaller type before it is
  // shortened.
  const room = img.width / pixelRatio - 24;
  g.fillStyle = '#1b1f24';
  g.fillText(clip(g, title, room, '600 ', 17, 11), 12, 26);
  g.fillStyle = '#5b636c';
  g.fillText(clip(g, subtitle, room, '', 13, 10), 12, 48);
  g.setTransform(1, 0, 0, 1, 0, 0);
  g.drawImage(img, 0, bandPx * pixelRatio);
  return canvas.toDataURL('image/png');
}

// clip sets g's font (weight, max … min px) to the largest size at which
// text fits width px, and shortens text with an ellipsis if even the
// smallest does not.
function clip(g, text, width, weight, max, min) {
  let s = String(text || '');
  let size = max;
  g.font = `${weight}${size}px system-ui, sans-serif`;
  while (size > min && g.measureText(s).width > width) g.font = `${weight}${--size}px system-ui, sans-serif`;
  if (g.measureText(s).width <= width) return s;
  while (s.length > 1 && g.measureText(`${s}…`).width > width) s = s.slice(0, -1);
  return `${s}…`;
}
