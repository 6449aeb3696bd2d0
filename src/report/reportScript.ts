// The report's only script (plain browser JavaScript, no imports): a small tooltip with the
// exact values of the mark under the pointer. Without it the charts still work: every mark keeps
// its SVG <title>, and the tables beside the charts hold the same numbers.
export const REPORT_SCRIPT = `(function () {
  var tip = document.getElementById('report-tooltip');
  if (!tip) return;
  // The custom tooltip replaces the browser's own one; the text stays as the mark's accessible name.
  var marks = document.querySelectorAll('[data-tip]');
  for (var i = 0; i < marks.length; i++) {
    var title = marks[i].querySelector('title');
    marks[i].setAttribute('aria-label', marks[i].getAttribute('data-tip'));
    if (title) title.parentNode.removeChild(title);
  }
  function hide() { tip.hidden = true; }
  document.addEventListener('pointermove', function (event) {
    var target = event.target && event.target.closest ? event.target.closest('[data-tip]') : null;
    if (!target) { hide(); return; }
    tip.textContent = target.getAttribute('data-tip');
    tip.hidden = false;
    var width = tip.offsetWidth, height = tip.offsetHeight;
    var left = Math.max(4, Math.min(event.clientX + 14, window.innerWidth - width - 8));
    var top = event.clientY + 16 + height > window.innerHeight ? event.clientY - height - 10 : event.clientY + 16;
    tip.style.left = left + 'px';
    tip.style.top = top + 'px';
  });
  document.addEventListener('pointerleave', hide);
  document.addEventListener('scroll', hide, true);
  document.addEventListener('keydown', function (event) { if (event.key === 'Escape') hide(); });
})();`;
