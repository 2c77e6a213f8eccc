% test_octave.m: the Octave host (bandmass.mex): answers equal the command
% line's, values convert with the documented shapes, errors carry ids.
1;

function out = cli(args, request)
  % The command line's answer, decoded with Octave's own jsondecode.
  input = '';
  if ~isempty(request)
    f = [tempname() '.json'];
    fid = fopen(f, 'w'); fputs(fid, request); fclose(fid);
    input = sprintf(' --input "%s"', f);
  end
  [status, text] = system(sprintf('"%s" %s%s 2>&1', getenv('BANDMASS_CLI'), args, input));
  if ~isempty(request)
    delete(f);
  end
  if status ~= 0
    error('test:cli', 'bandmass %s failed: %s', args, text);
  end
  out = jsondecode(text);
end

function check(cond, what)
  if ~cond
    error('test:failed', 'check failed: %s', what);
  end
end

function same(a, b, where)
  % Equal up to vector orientation (jsondecode gives columns, bandmass rows).
  if isstruct(a)
    check(isstruct(b) && numel(a) == numel(b), [where ': struct']);
    fa = fieldnames(a); fb = fieldnames(b);
    check(isequal(sort(fa), sort(fb)), [where ': fields']);
    for i = 1:numel(a)
      for k = 1:numel(fa)
        same(a(i).(fa{k}), b(i).(fa{k}), sprintf('%s(%d).%s', where, i, fa{k}));
      end
    end
  elseif iscell(a)
    check(iscell(b) && numel(a) == numel(b), [where ': cell']);
    for i = 1:numel(a)
      same(a{i}, b{i}, sprintf('%s{%d}', where, i));
    end
  elseif ischar(a)
    check(ischar(b) && strcmp(a, b), [where ': text']);
  else
    % Two slack terms, both below any printed digit: Octave's jsondecode
    % parses without full precision (1-2 ulp), and inside Octave GSL's BLAS
    % calls bind to Octave's own BLAS, so least-squares fits may differ from
    % the CLI's in the last few ulp (seen: 5e-16 relative).
    a = double(a(:)); b = double(b(:));
    check(numel(a) == numel(b), [where ': count']);
    check(all(isnan(a) == isnan(b)), [where ': NaN']);
    ok = ~isnan(a);
    d = abs(a(ok) - b(ok));
    check(all(d <= 1e-12 * max(abs(a(ok)), abs(b(ok))) | d <= 1e-14), [where ': numbers']);
  end
end

function expect_error(id, fragment, varargin)
  try
    bandmass(varargin{:});
  catch err
    check(strcmp(err.identifier, id), sprintf('id %s, wanted %s', err.identifier, id));
    check(~isempty(strfind(err.message, fragment)), ['message: ' err.message]);
    return;
  end
  error('test:failed', 'no error raised (wanted %s)', id);
end

% --- constants: the same numbers as the CLI, whichever way the request goes
ref = cli('call constants', '{}');
r = bandmass('constants', struct());
same(r, ref, 'constants');
check(isequal(bandmass('constants'), r), 'no request means {}');
check(isequal(bandmass('constants', '{}'), r), 'JSON text request');
% exactly the CLI's digits: compare with the number text it prints
[~, text] = system(sprintf('echo "{}" | "%s" call constants', getenv('BANDMASS_CLI')));
names = fieldnames(ref.constants);
for k = 1:numel(names)
  digits = regexp(text, ['"' names{k} '" : {\s*"value" : ([-+0-9.eE]+)'], 'tokens', 'once');
  check(r.constants.(names{k}).value == str2double(digits{1}), names{k});
end
check(iscell(r.warnings) || isempty(r.warnings), 'warnings present');

% --- the operation list, as `bandmass ops --json`
ops = bandmass();
ref_ops = cli('ops --json', '');
check(isequal({ops.name}, {ref_ops.name}), 'operation names');
check(isequal({ops.summary}, {ref_ops.summary}), 'operation summaries');

% --- shapes of the conversion, checked against Octave's own jsondecode
text = '{"m": [[1,2,3],[4,5,6]], "v": [1, null, 3], "s": [{"a":1},{"a":2}], "w": ["x","y"], "t": true, "n": null, "e": []}';
x = bandmass('--decode', text);
y = jsondecode(text);
check(isequal(size(x.m), [2 3]) && isequal(x.m, y.m), 'matrix: rows are the outer index');
check(isequal(size(x.v), [1 3]) && isequaln(x.v, y.v.'), 'row vector, null as NaN');
check(isstruct(x.s) && isequal(size(x.s), [1 2]) && x.s(2).a == 2, 'struct array');
check(iscellstr(x.w) && isequal(x.w, y.w.'), 'strings as a cell array');
check(islogical(x.t) && x.t, 'logical');
check(isempty(x.n) && isempty(x.e), 'null and [] as empty');
sent = bandmass('--encode', struct('mesh', [4 4 2], 'axes', [1 0 0; 0 1 0], 'name', 'cb', ...
                                   'on', true, 'parts', {{1, 'two'}}, 'n', int32(7)));
check(strcmp(sent, '{"mesh":[4,4,2],"axes":[[1,0,0],[0,1,0]],"name":"cb","on":true,"parts":[1,"two"],"n":7}'), ...
      ['encode: ' sent]);
same(jsondecode(sent), bandmass('--decode', sent), 'encode/decode round trip');

% --- numbers are sent exactly: the request object is built from the Octave
% value (no JSON text in between) and the one writer spells what was sent
sent = bandmass('--encode', struct('a', 1e17, 'b', 2e17, 'c', 1e20, 'd', 1e300, 'e', -0, ...
                                   'f', int64(2)^53 + 1, 'g', intmax('int64'), ...
                                   'h', uint64(2)^53 + 1, 'i', 0.1, 'j', 5e-324, 'k', single(0.5), ...
                                   'l', intmin('int64'), 'm', 300));
check(strcmp(sent, ['{"a":1e17,"b":2e17,"c":1e20,"d":1e300,"e":-0.0,"f":9007199254740993,' ...
                    '"g":9223372036854775807,"h":9007199254740993,"i":0.1,"j":5e-324,"k":0.5,' ...
                    '"l":-9223372036854775808,"m":300}']), ['exact encode: ' sent]);
% what the operation received: fermi-integral repeats eta, and for order 0
% F_0(eta) = ln(1 + e^eta) = eta + ln(1 + e^-eta), which is eta itself in
% doubles once e^-eta underflows (mathematical identity)
eta = [1e17 2e17 1e20 1e300 -0];
fi = bandmass('fermi-integral', struct('order', 0, 'eta', eta));
check(isequal(fi.eta, eta), 'fermi-integral received the doubles exactly');
check(1 / fi.eta(5) == -Inf, 'fermi-integral received -0.0 as -0.0');
check(isequal(fi.values(1:4), eta(1:4)), 'F_0(eta) = eta for eta >= 1e17 (identity)');
% the integer classes above 2^53 arrive exact: the band index is repeated
% in the registry's message
grid = fullfile(getenv('BANDMASS_TEST_DIR'), '..', 'data', 'grid-small.json');
expect_error('bandmass:invalidInput', 'band index 9007199254740993 is out of range', ...
             'mass-tensor', struct('grid', grid, 'band', int64(2)^53 + 1));
expect_error('bandmass:invalidInput', 'band index 9223372036854775807 is out of range', ...
             'mass-tensor', struct('grid', grid, 'band', intmax('int64')));
expect_error('bandmass:invalidInput', 'band index 9007199254740993 is out of range', ...
             'mass-tensor', struct('grid', grid, 'band', uint64(2)^53 + 1));
expect_error('bandmass:invalidInput', ...
             'request.band: the uint64 value 18446744073709551615 cannot be sent', ...
             'mass-tensor', struct('grid', grid, 'band', intmax('uint64')));
% values of other classes are refused, naming the field path
expect_error('bandmass:invalidInput', 'request.f: a function_handle value: this class cannot be sent', ...
             'constants', struct('f', @sin));
expect_error('bandmass:invalidInput', 'request.z{2}: a double value: complex numbers cannot be sent', ...
             'constants', struct('z', {{1, 1 + 2i}}));
expect_error('bandmass:invalidInput', 'request.s: a double value: sparse matrices cannot be sent', ...
             'constants', struct('s', sparse(eye(2))));
expect_error('bandmass:invalidInput', 'request.c: a char value: a char array must be one row', ...
             'constants', struct('c', ['ab'; 'cd']));
expect_error('bandmass:invalidInput', 'request.t(2).x: NaN and Inf cannot be sent', ...
             'constants', struct('t', struct('x', {1, Inf})));
% a sparse value is refused before its data is read (a sparse array keeps
% only its non-zeros: read as full it would send memory past its end)
expect_error('bandmass:invalidInput', 'request.eta: a double value: sparse matrices cannot be sent', ...
             'fermi-integral', struct('order', 0.5, 'eta', sparse([0 0 2])));
expect_error('bandmass:invalidInput', 'request.b: a logical value: sparse matrices cannot be sent', ...
             'constants', struct('b', sparse([true false])));
expect_error('bandmass:invalidInput', 'request.z: a single value: complex numbers cannot be sent', ...
             'constants', struct('z', single(1i)));
expect_error('bandmass:invalidInput', 'request.c: a cell value: a cell array must be 1xN or Nx1', ...
             'constants', struct('c', {{1, 2; 3, 4}}));
expect_error('bandmass:invalidInput', 'request.s: a struct value: a struct array must be 1xN or Nx1', ...
             'constants', struct('s', repmat(struct('a', 1), 2, 2)));
expect_error('bandmass:invalidInput', 'request.t: a char value: character 2 is NUL', ...
             'constants', struct('t', char([104 0 105])));
expect_error('bandmass:invalidInput', 'request.t: a char value: byte 1 (\xC8) is not UTF-8', ...
             'constants', struct('t', char([200 201])));
expect_error('bandmass:invalidInput', 'request.u: the uint64 value 9223372036854775808 cannot be sent', ...
             'constants', struct('u', uint64(2)^63));
expect_error('bandmass:invalidInput', 'request.c{1}.f: a function_handle value', ...
             'constants', struct('c', {{struct('f', @cos)}}));
% each of the other classes and shapes is converted as documented
sent = bandmass('--encode', struct('i8', int8([-128 127]), 'u8', uint8(255), 'i16', int16(-32768), ...
                                   'u16', uint16(65535), 'i32', intmin('int32'), ...
                                   'u32', intmax('uint32'), 'b', [true false], 'e1', zeros(0, 3), ...
                                   'e2', zeros(3, 0), 'e3', '', 'e4', {{}}, 'e5', int8([]), ...
                                   'cs', {{struct('a', 1), 'x'}}, 'sa', struct('a', {1, 2}), ...
                                   'col', {{1; 2}}, 'f', single(0.1), 'txt', char([99 97 102 195 169])));
check(strcmp(sent, ['{"i8":[-128,127],"u8":255,"i16":-32768,"u16":65535,"i32":-2147483648,' ...
                    '"u32":4294967295,"b":[true,false],"e1":[],"e2":[],"e3":"","e4":[],"e5":[],' ...
                    '"cs":[{"a":1},"x"],"sa":[{"a":1},{"a":2}],"col":[1,2],' ...
                    '"f":0.10000000149011612,"txt":"caf' char([195 169]) '"}']), ['classes: ' sent]);

% --- errors carry an identifier and the registry's message
expect_error('bandmass:invalidInput', 'request key "colour" is not a parameter of constants', ...
             'constants', struct('colour', 1));
expect_error('bandmass:unknownOperation', 'no operation named "nonesuch"', 'nonesuch');
expect_error('bandmass:invalidInput', 'not valid JSON', 'constants', '{"a": ');
expect_error('bandmass:invalidInput', 'request.depth: NaN and Inf cannot be sent', ...
             'constants', struct('depth', NaN));
expect_error('bandmass:usage', 'the operation name must be a string', 42);

% --- operations that land later: each answer must equal the CLI's
has = @(name) any(strcmp({ops.name}, name));
if has('mass-tensor')
  % a cosine band E = sum 2 t (1 - cos k a), simple cubic a = 4 A, 12^3 mesh,
  % written as a band grid document with inline energies [band][i][j][l]
  n = 12; a = 4.0; t = [0.5 1.0 2.0];
  k = 2 * pi / a * (0:n-1) / n;
  [kx, ky, kz] = ndgrid(k, k, k);          % kx(i, j, l)
  e = 2*t(1)*(1 - cos(kx*a)) + 2*t(2)*(1 - cos(ky*a)) + 2*t(3)*(1 - cos(kz*a));
  rows = cell(1, n);
  for i = 1:n
    planes = cell(1, n);
    for j = 1:n
      planes{j} = ['[' strjoin(arrayfun(@(v) sprintf('%.17g', v), squeeze(e(i, j, :)).', ...
                                        'UniformOutput', false), ',') ']'];
    end
    rows{i} = ['[' strjoin(planes, ',') ']'];
  end
  doc = sprintf(['{"format": "bandmass-grid-1", "reciprocal_vectors_inv_angstrom": %s, ' ...
                 '"mesh": [%d, %d, %d], "band_names": ["cb"], "energies_ev": [[%s]]}'], ...
                jsonencode(2*pi/a*eye(3)), n, n, n, strjoin(rows, ','));
  f = [tempname() '.json'];
  fid = fopen(f, 'w'); fputs(fid, doc); fclose(fid);
  req = struct('grid', f, 'band', 'cb', 'extremum', 'minimum');
  got = bandmass('mass-tensor', req);
  want = cli('call mass-tensor', jsonencode(req));
  delete(f);
  same(got, want, 'mass-tensor');
  x1 = got.extrema(1);
  check(strcmp(x1.kind, 'minimum'), 'a minimum');
  check(isequal(size(x1.inverse_mass_tensor_per_me), [3 3]), 'tensor is 3x3');
  check(isequal(size(x1.principal_axes), [3 3]), 'axes are 3x3');
  check(isequal(size(x1.principal_masses_me), [1 3]), 'masses are a row');
  % synthetic round trip: 2 t (1 - cos ka) = t a^2 k^2 + O(k^4) (Taylor), so
  % m/m_e = (hbar^2/m_e) / (2 t a^2), hbar^2/m_e from the constants operation
  want_m = sort(r.constants.hbar2_over_me_ev_a2.value ./ (2 * t * a^2));
  check(all(abs(sort(x1.principal_masses_me) - want_m) <= 1e-6 * want_m), 'masses of the cosine band');
  printf('mass-tensor: checked against the CLI and the cosine band\n');
else
  printf('mass-tensor: not in the registry yet, not checked\n');
end
if has('carrier-statistics')
  % JSON text request, as in tests/hosts/requests/
  text = fileread(fullfile(getenv('BANDMASS_TEST_DIR'), 'requests', 'carrier-statistics.json'));
  got = bandmass('carrier-statistics', text);
  same(got, cli('call carrier-statistics', text), 'carrier-statistics (JSON request)');
  check(isstruct(got.points) && isequal(size(got.points), [1 3]), 'points are a 1x3 struct array');
  % the same request as an Octave struct: a one-element list of objects is a cell
  req = struct('material', 'Si', 'temperatures_k', [200 300 400], ...
               'donors', {{struct('species', 'P', 'density_cm3', 1e16)}});
  same(bandmass('carrier-statistics', req), got, 'carrier-statistics (struct request)');
  % a point at 300 K through the struct route equals the CLI's
  one = bandmass('carrier-statistics', struct('material', 'Si', 'temperature_k', 300));
  same(one, cli('call carrier-statistics', '{"material": "Si", "temperature_k": 300}'), ...
       'carrier-statistics at 300 K');
  check(one.ni_cm3 > 0 && one.ni_cm3 < one.nc_cm3, 'ni below Nc');
  % a donor density of 1e17 and above (written 1e+17.0 by json-glib, which is
  % not JSON): the response repeats the density exactly as sent
  req = struct('material', 'GaAs', 'temperature_k', 300, ...
               'donors', {{struct('species', 'Si', 'density_cm3', 1e17)}});
  got = bandmass('carrier-statistics', req);
  check(got.donors(1).density_cm3 == 1e17, 'density 1e17 received exactly');
  same(got, cli('call carrier-statistics', jsonencode(req)), 'carrier-statistics at 1e17');
  % a doping sweep over logspace(14, 20, 13), each point as the CLI answers
  densities = logspace(14, 20, 13);
  for d = densities
    req = struct('material', 'GaAs', 'temperature_k', 300, ...
                 'donors', {{struct('species', 'Si', 'density_cm3', d)}});
    got = bandmass('carrier-statistics', req);
    check(got.donors(1).density_cm3 == d, sprintf('density %.17g received exactly', d));
    same(got, cli('call carrier-statistics', sprintf(['{"material": "GaAs", "temperature_k": 300, ' ...
         '"donors": [{"species": "Si", "density_cm3": %.17g}]}'], d)), ...
         sprintf('carrier-statistics at %g cm^-3', d));
  end
  printf('carrier-statistics: checked against the CLI\n');
else
  printf('carrier-statistics: not in the registry yet, not checked\n');
end
printf('octave: all checks passed\n');
