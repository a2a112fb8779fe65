// Interactive traces for report.html, written for lapwing (no library). Embedded in the page at
// build time (src/report/CMakeLists: traces.js -> a C++ string), so the page stays one file and
// fetches nothing. With scripts off, and in print, the static SVG beside each live plot stays.
//
// Per track, one <div class="traces"> holds the data (<script type="application/json">) and a
// <figure class="trace" data-plot="KEY"> per plot. Each figure gets a live SVG drawn at the
// figure's width; all plots of a track share one distance range (zoom) and one cursor.
//   drag across a plot: zoom every plot of the track to that distance range
//   double-click, or the "whole lap" button: back to the whole lap
//   a corner's number (on a plot or in the corners table): zoom to that corner
//   pointer over a plot: a cursor on every plot, each reading out every config's value there
(function () {
  'use strict';
  var NS = 'http://www.w3.org/2000/svg';
  var M = {l: 64, r: 24, t: 30, b: 46};  // margins (px); the legend sits above the plot area

  function svgEl(tag, attrs, parent) {
    var e = document.createElementNS(NS, tag);
    for (var k in attrs) e.setAttribute(k, attrs[k]);
    if (parent) parent.appendChild(e);
    return e;
  }
  function htmlEl(tag, cls, parent) {
    var e = document.createElement(tag);
    if (cls) e.className = cls;
    if (parent) parent.appendChild(e);
    return e;
  }
  // A 1-2-5 step giving about `count` intervals over [lo, hi] (as svg.cpp's nice_ticks).
  function tickStep(lo, hi, count) {
    var raw = (hi - lo) / Math.max(1, count);
    var mag = Math.pow(10, Math.floor(Math.log10(raw)));
    var steps = [1, 2, 5, 10];
    for (var i = 0; i < steps.length; i++) if (raw <= steps[i] * mag) return steps[i] * mag;
    return 10 * mag;
  }
  function ticks(lo, hi, count) {
    var step = tickStep(lo, hi, count), out = [];
    for (var v = Math.ceil(lo / step - 1e-9) * step; v <= hi + step * 1e-9; v += step)
      out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
    return {values: out, step: step};
  }
  function tickText(v, step) {
    var d = step >= 1 ? 0 : Math.ceil(-Math.log10(step) - 1e-9);
    return v.toFixed(Math.max(0, d));
  }
  // First index with x[i] >= v (binary search on the increasing distance).
  function lowerBound(x, v) {
    var lo = 0, hi = x.length;
    while (lo < hi) {
      var mid = (lo + hi) >> 1;
      if (x[mid] < v) lo = mid + 1; else hi = mid;
    }
    return lo;
  }
  // y at distance v, linear between the neighbouring points.
  function valueAt(x, y, v) {
    var i = Math.min(Math.max(lowerBound(x, v), 1), x.length - 1);
    var w = (v - x[i - 1]) / (x[i] - x[i - 1]);
    return y[i - 1] + Math.max(0, Math.min(1, w)) * (y[i] - y[i - 1]);
  }

  function setup(group) {
    var data = JSON.parse(group.querySelector('script.trace-data').textContent);
    var x = data.x;
    var state = {x0: x[0], x1: x[x.length - 1], cursor: null, plots: []};
    var figures = group.querySelectorAll('figure.trace');
    for (var f = 0; f < figures.length; f++) {
      var fig = figures[f];
      var spec = data.plots[fig.getAttribute('data-plot')];
      if (!spec) continue;
      var live = htmlEl('div', 'live', null);
      fig.insertBefore(live, fig.firstChild);
      var svg = svgEl('svg', {'class': 'plot live-plot', role: 'img',
                              'aria-label': spec.title}, live);
      var readout = htmlEl('div', 'readout', live);
      readout.hidden = true;
      state.plots.push({fig: fig, live: live, svg: svg, readout: readout, spec: spec,
                        key: fig.getAttribute('data-plot')});
    }
    var bar = group.querySelector('.zoom-bar');
    var label = bar ? bar.querySelector('.zoom-range') : null;

    function zoom(a, b) {
      var full0 = x[0], full1 = x[x.length - 1];
      a = Math.max(full0, Math.min(a, b));
      b = Math.min(full1, Math.max(a, b));
      if (!(b - a > 1)) return;  // under a metre: nothing to see
      state.x0 = a;
      state.x1 = b;
      drawAll();
    }
    function zoomCorner(id) {
      for (var i = 0; i < data.corners.length; i++) {
        var c = data.corners[i];  // [id, start, apex, end]
        if (c[0] === id) {
          var pad = Math.max(40, 0.25 * (c[3] - c[1]));
          zoom(c[1] - pad, c[3] + pad);
          return true;
        }
      }
      return false;
    }
    function drawAll() {
      for (var i = 0; i < state.plots.length; i++) draw(state.plots[i]);
      if (label)
        label.textContent = state.x0.toFixed(0) + '\u2013' + state.x1.toFixed(0) + ' m';
      group.setAttribute('data-x0', state.x0.toFixed(1));
      group.setAttribute('data-x1', state.x1.toFixed(1));
    }

    function draw(p) {
      var spec = p.spec, svg = p.svg;
      var W = Math.max(320, Math.round(p.live.clientWidth)), H = spec.height || 320;
      while (svg.firstChild) svg.removeChild(svg.firstChild);
      svg.setAttribute('width', W);
      svg.setAttribute('height', H);
      svg.setAttribute('viewBox', '0 0 ' + W + ' ' + H);
      svg.setAttribute('data-x0', state.x0.toFixed(1));
      svg.setAttribute('data-x1', state.x1.toFixed(1));
      var px0 = M.l, px1 = W - M.r, py0 = H - M.b;
      // Title, then the legend in rows after it (names shortened as in the static plot); the
      // plot area starts below the last row.
      var title = svgEl('text', {'class': 'plot-title', x: px0, y: 18}, svg);
      title.textContent = spec.title;
      var lx = px0 + title.getComputedTextLength() + 24, ly = 18;
      spec.series.forEach(function (s) {
        var name = s.short || s.name;
        var g = svgEl('g', {'class': 'legend-entry'}, svg);
        svgEl('line', {x1: 0, y1: -4, x2: 16, y2: -4, stroke: data.colours[s.c],
                       'stroke-width': 2.4}, g);
        var t = svgEl('text', {'class': 'legend', x: 20, y: 0}, g);
        t.textContent = name;
        svgEl('title', {}, t).textContent = s.name;
        var w = 20 + t.getComputedTextLength() + 14;
        if (lx + w > px1 && lx > px0) {
          lx = px0;
          ly += 16;
        }
        g.setAttribute('transform', 'translate(' + lx + ' ' + ly + ')');
        lx += w;
      });
      var py1 = ly + 22;
      // Visible points, one either side so that lines reach the edges.
      var i0 = Math.max(0, lowerBound(x, state.x0) - 1);
      var i1 = Math.min(x.length - 1, lowerBound(x, state.x1));
      var lo = Infinity, hi = -Infinity;
      spec.series.forEach(function (s) {
        [s.y, s.raw].forEach(function (y) {
          if (!y) return;
          for (var i = i0; i <= i1; i++) {
            if (y[i] < lo) lo = y[i];
            if (y[i] > hi) hi = y[i];
          }
        });
      });
      if (spec.band) {
        lo = Math.min(lo, spec.band[0]);
        hi = Math.max(hi, spec.band[1]);
      }
      if (!(hi > lo)) { lo -= 0.5; hi += 0.5; }
      var ys = tickStep(lo, hi, 5);
      lo = Math.floor(lo / ys) * ys;
      hi = Math.ceil(hi / ys) * ys;
      var sx = function (v) { return px0 + (v - state.x0) * (px1 - px0) / (state.x1 - state.x0); };
      var sy = function (v) { return py0 + (v - lo) * (py1 - py0) / (hi - lo); };
      p.sx = sx;
      p.px0 = px0;
      p.px1 = px1;
      p.py0 = py0;
      p.py1 = py1;
      var clipId = svg.parentNode.parentNode.querySelector('.static svg').id + '-live-clip';
      var defs = svgEl('defs', {}, svg);
      var clip = svgEl('clipPath', {id: clipId}, defs);
      svgEl('rect', {x: px0, y: py1, width: px1 - px0, height: py0 - py1}, clip);
      var grid = svgEl('g', {'class': 'grid'}, svg);
      var xt = ticks(state.x0, state.x1, Math.max(3, Math.round((px1 - px0) / 110)));
      xt.values.forEach(function (v) {
        svgEl('line', {x1: sx(v), y1: py0, x2: sx(v), y2: py1}, grid);
        svgEl('text', {'class': 'tick', x: sx(v), y: py0 + 15, 'text-anchor': 'middle'}, grid)
            .textContent = tickText(v, xt.step);
      });
      var yt = ticks(lo, hi, 5);
      yt.values.forEach(function (v) {
        svgEl('line', {x1: px0, y1: sy(v), x2: px1, y2: sy(v)}, grid);
        svgEl('text', {'class': 'tick', x: px0 - 6, y: sy(v) + 4, 'text-anchor': 'end'}, grid)
            .textContent = tickText(v, yt.step);
      });
      svgEl('rect', {'class': 'frame', x: px0, y: py1, width: px1 - px0, height: py0 - py1}, svg);
      var body = svgEl('g', {'clip-path': 'url(#' + clipId + ')'}, svg);
      if (spec.band) {
        svgEl('rect', {'class': 'window-band', x: px0, y: sy(spec.band[1]), width: px1 - px0,
                       height: sy(spec.band[0]) - sy(spec.band[1])}, body);
      }
      function polyline(y, cls, colour, width) {
        var pts = [];
        for (var i = i0; i <= i1; i++) pts.push(sx(x[i]).toFixed(1) + ',' + sy(y[i]).toFixed(1));
        svgEl('polyline', {'class': cls, fill: 'none', stroke: colour, 'stroke-width': width,
                           'stroke-linejoin': 'round', points: pts.join(' ')}, body);
      }
      spec.series.forEach(function (s) {
        if (s.raw) polyline(s.raw, 'raw', data.colours[s.c], 0.8);
      });
      spec.series.forEach(function (s) { polyline(s.y, 'series', data.colours[s.c], 1.6); });
      (spec.marks || []).forEach(function (m) {  // [x, y, colour, text]
        if (m[0] < state.x0 || m[0] > state.x1) return;
        svgEl('circle', {'class': 'worst-mark', cx: sx(m[0]), cy: sy(m[1]), r: 4.5,
                         stroke: data.colours[m[2]]}, body).appendChild(
            svgEl('title', {})).textContent = m[3];
      });
      // Corner numbers at their apexes: buttons that zoom to the corner.
      data.corners.forEach(function (c) {
        if (c[2] < state.x0 || c[2] > state.x1) return;
        svgEl('line', {'class': 'marker', x1: sx(c[2]), y1: py0, x2: sx(c[2]), y2: py1}, body);
        var t = svgEl('text', {'class': 'marker-text corner-link', x: sx(c[2]), y: py1 - 4,
                               'text-anchor': 'middle', 'data-corner': c[0], tabindex: 0,
                               role: 'button'}, svg);
        t.textContent = String(c[0]);
        svgEl('title', {}, t).textContent = 'zoom to corner ' + c[0];
      });
      svgEl('text', {'class': 'axis-title', x: 0.5 * (px0 + px1), y: H - 8,
                     'text-anchor': 'middle'}, svg).textContent = 'distance (m)';
      svgEl('text', {'class': 'axis-title', transform: 'translate(16 ' + 0.5 * (py0 + py1) +
                     ') rotate(-90)', 'text-anchor': 'middle'}, svg).textContent = spec.ytitle;
      p.cursorLine = svgEl('line', {'class': 'cursor', x1: 0, y1: py0, x2: 0, y2: py1,
                                    visibility: 'hidden'}, svg);
      p.select = svgEl('rect', {'class': 'selection', x: 0, y: py1, width: 0,
                                height: py0 - py1, visibility: 'hidden'}, svg);
      showCursor(p);
    }

    function showCursor(p) {
      var v = state.cursor;
      if (v === null || v < state.x0 || v > state.x1) {
        p.cursorLine.setAttribute('visibility', 'hidden');
        p.readout.hidden = true;
        return;
      }
      var px = p.sx(v);
      p.cursorLine.setAttribute('x1', px);
      p.cursorLine.setAttribute('x2', px);
      p.cursorLine.setAttribute('visibility', 'visible');
      var r = p.readout;
      while (r.firstChild) r.removeChild(r.firstChild);
      htmlEl('div', 'readout-head', r).textContent = v.toFixed(0) + ' m';
      p.spec.series.forEach(function (s) {
        var row = htmlEl('div', 'readout-row', r);
        row.setAttribute('data-config', s.name);
        var sw = htmlEl('span', 'swatch', row);
        sw.style.background = data.colours[s.c];
        htmlEl('span', 'readout-name', row).textContent = s.short || s.name;
        htmlEl('span', 'readout-value', row).textContent =
            valueAt(x, s.y, v).toFixed(p.spec.decimals) + ' ' + p.spec.unit;
      });
      r.hidden = false;
      // Beside the cursor, on the side with room.
      var w = r.offsetWidth;
      r.style.left = (px + 12 + w > p.px1 ? px - 12 - w : px + 12) + 'px';
      r.style.top = (p.py1 + 4) + 'px';
    }
    function showCursors() { state.plots.forEach(showCursor); }

    // Pointer: cursor on every plot; a drag selects a distance range to zoom to.
    state.plots.forEach(function (p) {
      var dragFrom = null;
      function distance(ev) {
        var rect = p.svg.getBoundingClientRect();
        var px = (ev.clientX - rect.left) * (p.svg.width.baseVal.value / rect.width);
        var v = state.x0 + (px - p.px0) * (state.x1 - state.x0) / (p.px1 - p.px0);
        return {px: px, v: v, inside: px >= p.px0 && px <= p.px1};
      }
      p.svg.addEventListener('pointerdown', function (ev) {
        if (ev.target.getAttribute && ev.target.getAttribute('data-corner')) return;
        var d = distance(ev);
        if (!d.inside || ev.button !== 0) return;
        dragFrom = d;
        p.svg.setPointerCapture(ev.pointerId);
        ev.preventDefault();
      });
      p.svg.addEventListener('pointermove', function (ev) {
        var d = distance(ev);
        state.cursor = d.inside ? d.v : null;
        if (d.inside) group.setAttribute('data-cursor', d.v.toFixed(3));
        showCursors();
        if (dragFrom) {
          var a = Math.max(p.px0, Math.min(dragFrom.px, d.px));
          var b = Math.min(p.px1, Math.max(dragFrom.px, d.px));
          p.select.setAttribute('x', a);
          p.select.setAttribute('width', b - a);
          p.select.setAttribute('visibility', 'visible');
        }
      });
      p.svg.addEventListener('pointerup', function (ev) {
        if (!dragFrom) return;
        var d = distance(ev), from = dragFrom;
        dragFrom = null;
        p.select.setAttribute('visibility', 'hidden');
        if (Math.abs(d.px - from.px) >= 6) zoom(Math.min(from.v, d.v), Math.max(from.v, d.v));
      });
      p.svg.addEventListener('pointerleave', function () {
        if (dragFrom) return;
        state.cursor = null;
        showCursors();
      });
      p.svg.addEventListener('dblclick', function () { zoom(x[0], x[x.length - 1]); });
      p.svg.addEventListener('click', function (ev) {
        var id = ev.target.getAttribute && ev.target.getAttribute('data-corner');
        if (id) zoomCorner(Number(id));
      });
      p.svg.addEventListener('keydown', function (ev) {
        var id = ev.target.getAttribute && ev.target.getAttribute('data-corner');
        if (id && (ev.key === 'Enter' || ev.key === ' ')) {
          zoomCorner(Number(id));
          ev.preventDefault();
        }
      });
    });
    if (bar) {
      bar.hidden = false;
      bar.querySelector('button').addEventListener('click', function () {
        zoom(x[0], x[x.length - 1]);
      });
    }
    // Corner numbers in the track's tables zoom too (and bring the traces into view).
    var section = group.closest('section') || document;
    section.querySelectorAll('a.corner-link[data-corner]').forEach(function (a) {
      a.addEventListener('click', function (ev) {
        if (zoomCorner(Number(a.getAttribute('data-corner')))) {
          ev.preventDefault();
          group.scrollIntoView({block: 'start'});
        }
      });
    });
    var pending = false;
    window.addEventListener('resize', function () {
      if (pending) return;
      pending = true;
      window.requestAnimationFrame(function () { pending = false; drawAll(); });
    });
    group.lapwingZoom = zoom;  // for the browser test and the console
    drawAll();
  }

  document.documentElement.classList.add('live-traces');
  document.querySelectorAll('div.traces').forEach(setup);
})();
