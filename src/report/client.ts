/**
 * The page's script, as text (it runs in the browser, offline). It reads the embedded data,
 * draws the course map for the chosen descriptor axes, opens the course clicked in the lineage
 * tree or the coverage map, shows a course's geometry and replays its walker with play/pause
 * and a scrubber.
 */
export const CLIENT_SCRIPT = String.raw`
(function () {
  'use strict';
  var data = JSON.parse(document.getElementById('report-data').textContent);
  var NS = 'http://www.w3.org/2000/svg';
  var byId = {};
  data.courses.forEach(function (c) { byId[c.id] = c; });
  function el(name, attrs, parent) {
    var e = document.createElementNS(NS, name);
    for (var k in attrs) e.setAttribute(k, attrs[k]);
    if (parent) parent.appendChild(e);
    return e;
  }
  function statusClass(c) { return c.solvedAt !== null ? 'solved' : c.status; }

  // Course map
  var axes = data.descriptorNames.map(function (name, i) { return { label: name, get: function (c) { return c.descriptor[i]; } }; });
  axes.push({ label: 'difficulty', get: function (c) { return c.difficulty; } });
  axes.push({ label: 'admitted at', get: function (c) { return c.admittedAt; } });
  var selX = document.getElementById('map-x');
  var selY = document.getElementById('map-y');
  axes.forEach(function (a, i) {
    [selX, selY].forEach(function (s) { var o = document.createElement('option'); o.value = String(i); o.textContent = a.label; s.appendChild(o); });
  });
  selX.value = '0';
  selY.value = String(axes.length - 2);
  function drawMap() {
    var svg = document.getElementById('map-svg');
    while (svg.firstChild) svg.removeChild(svg.firstChild);
    var W = 520, H = 340, L = 48, R = 14, T = 14, B = 36;
    var ax = axes[+selX.value], ay = axes[+selY.value];
    var xs = data.courses.map(ax.get), ys = data.courses.map(ay.get);
    var x0 = Math.min.apply(null, xs.concat([0])), x1 = Math.max.apply(null, xs.concat([1e-9]));
    var y0 = Math.min.apply(null, ys.concat([0])), y1 = Math.max.apply(null, ys.concat([1e-9]));
    function sx(v) { return L + (v - x0) / ((x1 - x0) || 1) * (W - L - R); }
    function sy(v) { return H - B - (v - y0) / ((y1 - y0) || 1) * (H - T - B); }
    el('line', { 'class': 'axis', x1: L, x2: W - R, y1: H - B, y2: H - B }, svg);
    el('line', { 'class': 'axis', x1: L, x2: L, y1: T, y2: H - B }, svg);
    el('text', { 'class': 'tick', x: W - R, y: H - 8, 'text-anchor': 'end' }, svg).textContent = ax.label + ' ' + x0.toFixed(2) + ' … ' + x1.toFixed(2);
    var yl = el('text', { 'class': 'tick', x: 12, y: T + 4, 'text-anchor': 'start' }, svg);
    yl.textContent = ay.label + ' ' + y0.toFixed(2) + ' … ' + y1.toFixed(2);
    data.courses.forEach(function (c, i) {
      var p = el('circle', { 'class': 'map-point ' + statusClass(c), cx: sx(xs[i]).toFixed(1), cy: sy(ys[i]).toFixed(1), r: 6, 'data-course': c.id }, svg);
      el('title', {}, p).textContent = 'course ' + c.id + ' (' + statusClass(c) + ')';
      p.addEventListener('click', function () { selectCourse(c.id); });
    });
  }
  selX.addEventListener('change', drawMap);
  selY.addEventListener('change', drawMap);
  drawMap();

  // Lineage and coverage-map clicks
  Array.prototype.forEach.call(document.querySelectorAll('#lineage .node, #coverage .cell'), function (g) {
    g.addEventListener('click', function () { selectCourse(+g.getAttribute('data-course')); });
  });

  // Course detail and replay
  var frame = 0, timer = null, current = null, parts = [];
  var playBtn = document.getElementById('play');
  var scrub = document.getElementById('scrub');
  function bounds(c) {
    var x0 = Math.min(-1, c.startX - 2), x1 = c.finishX + 2, y0 = Infinity, y1 = -Infinity;
    for (var i = 0; i < c.ground.length; i += 2) {
      if (c.ground[i] < x0 || c.ground[i] > x1) continue;
      y0 = Math.min(y0, c.ground[i + 1]); y1 = Math.max(y1, c.ground[i + 1]);
    }
    // The ground at the window's edges too, as courseBounds does: a flat course has no vertex inside.
    [x0, x1].forEach(function (x) {
      var y = heightAt(c.ground, x);
      if (isFinite(y)) { y0 = Math.min(y0, y); y1 = Math.max(y1, y); }
    });
    c.obstacles.forEach(function (p) { for (var k = 1; k < p.length; k += 2) y1 = Math.max(y1, p[k]); });
    return { x0: x0, x1: x1, y0: y0 - 0.3, y1: y1 + 1.8 };
  }
  function heightAt(g, x) {
    var best = -Infinity;
    for (var i = 0; i + 3 < g.length; i += 2) {
      if (x < g[i] || x > g[i + 2]) continue;
      var y = g[i + 2] === g[i] ? Math.max(g[i + 1], g[i + 3]) : g[i + 1] + (g[i + 3] - g[i + 1]) * (x - g[i]) / (g[i + 2] - g[i]);
      best = Math.max(best, y);
    }
    return best;
  }
  function drawCourse(c) {
    var svg = document.getElementById('course-svg');
    while (svg.firstChild) svg.removeChild(svg.firstChild);
    var b = bounds(c);
    svg.setAttribute('viewBox', '0 0 ' + ((b.x1 - b.x0) * 40).toFixed(0) + ' ' + ((b.y1 - b.y0) * 40).toFixed(0));
    var g = el('g', { transform: 'scale(40 -40) translate(' + (-b.x0) + ' ' + (-b.y1) + ')' }, svg);
    var pts = [];
    for (var i = 0; i < c.ground.length; i += 2) pts.push(c.ground[i] + ',' + c.ground[i + 1]);
    pts.push(c.ground[c.ground.length - 2] + ',' + b.y0, c.ground[0] + ',' + b.y0);
    el('polygon', { 'class': 'ground', points: pts.join(' ') }, g);
    c.obstacles.forEach(function (p) {
      var q = [];
      for (var k = 0; k < p.length; k += 2) q.push(p[k] + ',' + p[k + 1]);
      el('polygon', { 'class': 'obstacle', points: q.join(' ') }, g);
    });
    el('line', { 'class': 'start-line', x1: c.startX, x2: c.startX, y1: b.y0, y2: 2.5 }, g);
    el('line', { 'class': 'finish-line', x1: c.finishX, x2: c.finishX, y1: b.y0, y2: 2.5 }, g);
    parts = data.segments.map(function (s, i) {
      var cls = i === 0 ? 'torso' : s.foot ? 'foot' : 'limb';
      return s.shape === 'circle' ? el('circle', { 'class': cls, r: s.radius }, g)
        : el('rect', { 'class': cls, x: -s.size[0] / 2, y: -s.size[1] / 2, width: s.size[0], height: s.size[1] }, g);
    });
  }
  function showFrame(k) {
    var frames = current.replay.frames;
    if (frames.length === 0) return;
    frame = Math.max(0, Math.min(frames.length - 1, k));
    var f = frames[frame];
    parts.forEach(function (p, i) {
      p.setAttribute('transform', 'translate(' + f[3 * i] + ' ' + f[3 * i + 1] + ') rotate(' + (f[3 * i + 2] * 180 / Math.PI).toFixed(2) + ')');
    });
    scrub.value = String(frame);
    document.getElementById('frame-label').textContent = 't = ' + (frame * current.replay.every * data.run.timeStep).toFixed(1) + ' s';
    document.getElementById('course-svg').setAttribute('data-frame', String(frame));
  }
  function stop() { if (timer) { clearInterval(timer); timer = null; } playBtn.textContent = 'Play'; }
  function play() {
    if (!current || current.replay.frames.length === 0) return;
    if (frame >= current.replay.frames.length - 1) showFrame(0);
    playBtn.textContent = 'Pause';
    timer = setInterval(function () {
      if (frame >= current.replay.frames.length - 1) { stop(); return; }
      showFrame(frame + 1);
    }, 100);
  }
  playBtn.addEventListener('click', function () { if (timer) stop(); else play(); });
  scrub.addEventListener('input', function () { stop(); showFrame(+scrub.value); });
  function selectCourse(id) {
    stop();
    current = byId[id];
    document.getElementById('course-id').textContent = String(id);
    var facts = [
      'parent ' + (current.parent === null ? '—' : current.parent),
      'admitted at iteration ' + current.admittedAt,
      current.status,
      current.crossedAt !== null ? 'crossed at iteration ' + current.crossedAt : 'not crossed',
      current.solvedAt !== null ? 'solved at iteration ' + current.solvedAt : 'not solved',
      'lineage ' + current.lineage,
      'difficulty ' + current.difficulty.toFixed(3),
      'features: ' + (current.features.join(', ') || 'none'),
      'best progress ' + current.best.toFixed(3),
      'replayed walker ' + current.walkerId + ' reaches ' + current.replay.progress.toFixed(3),
    ];
    if (current.source) facts.push('branched from course ' + current.source.courseId + ' of run ' + current.source.fingerprint.slice(0, 12));
    document.getElementById('course-facts').textContent = facts.join(' · ');
    Array.prototype.forEach.call(document.querySelectorAll('.selected'), function (e) { e.classList.remove('selected'); });
    Array.prototype.forEach.call(document.querySelectorAll('[data-course="' + id + '"]'), function (e) { e.classList.add('selected'); });
    scrub.max = String(Math.max(0, current.replay.frames.length - 1));
    drawCourse(current);
    showFrame(0);
  }
  window.cairnReport = { selectCourse: selectCourse, play: play, stop: stop };
  selectCourse(data.initialCourse);
})();
`;
