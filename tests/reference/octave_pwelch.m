% Reference Welch spectra from Octave's signal package (pwelch) for Corvane's spline + Welch route
% (lib/engine/frequency/welch.ts).
%
% Input: the 4 Hz natural-cubic-spline series that tests/reference/scipy_spectra.py wrote (scipy's CubicSpline),
% read from scipy_spectra.json beside the output file; run.sh runs the Python scripts before this one. Octave has no
% natural-spline routine of its own, so this checks pwelch alone, on exactly the series scipy's welch saw.
% Each series: mean removed, then pwelch with the periodic Hann window 0.5 - 0.5*cos(2*pi*n/256) (given as a vector),
% overlap 0.5 (a fraction, as Octave's pwelch wants it), Nfft 256, Fs 4 Hz, one-sided, linear detrend per segment.
% Band powers integrate the linearly interpolated PSD between the band edges (interp1 + trapz).
%
% Usage: octave-cli --no-gui --quiet --norc octave_pwelch.m OUTPUT.json
pkg load signal;
args = argv();
out_path = args{1};
scipy_path = fullfile(fileparts(out_path), 'scipy_spectra.json');
scipy = jsondecode(fileread(scipy_path));

bands = struct('vlf', [0.003 0.04], 'lf', [0.04 0.15], 'hf', [0.15 0.40]);
n = 256;
w = 0.5 - 0.5 * cos(2 * pi * (0:n-1)' / n);

function p = band_power(f, psd, lo, hi)
  inner = f(f > lo & f < hi);
  xs = [lo; inner(:); hi];
  p = trapz(xs, interp1(f, psd, xs, 'linear'));
end

cases = {};
src = scipy.cases;
if ~iscell(src)
  src = num2cell(src);
end
for i = 1:numel(src)
  c = src{i};
  if ~strcmp(c.kind, 'window')
    continue;
  end
  x = c.resampled.values(:);
  x = x - mean(x);
  [psd, f] = pwelch(x, w, 0.5, n, c.resampled.rate_hz, 'onesided', 'linear');
  r = struct();
  r.name = c.name;
  r.f = f(:)';
  r.psd = psd(:)';
  fn = fieldnames(bands);
  for b = 1:numel(fn)
    edges = bands.(fn{b});
    r.(fn{b}) = band_power(f(:), psd(:), edges(1), edges(2));
  end
  cases{end+1} = r;
end

v = ver('signal');
fixture = struct();
fixture.source = 'Octave signal package pwelch';
fixture.generated_by = 'tests/reference/octave_pwelch.m';
fixture.tool_versions = struct('octave', OCTAVE_VERSION, 'signal', v.Version);
fixture.input = 'resampled series from tests/reference/fixtures/scipy_spectra.json (scipy CubicSpline, natural)';
fixture.cases = cases;
fid = fopen(out_path, 'w');
fputs(fid, jsonencode(fixture));
fputs(fid, "\n");
fclose(fid);
