// Loads the page's modules and says so plainly when they cannot load (for example when
// the engine has not been built: run web/build.sh).
import('./app.js').catch((e) => {
  const area = document.getElementById('messages-error');
  const box = document.createElement('div');
  box.className = 'message message-error';
  const p = document.createElement('p');
  p.className = 'message-heading';
  p.textContent = 'The page could not start: ' + String((e && e.message) || e);
  box.append(p);
  if (area) area.append(box);
  document.getElementById('app')?.setAttribute('data-state', 'error');
});
