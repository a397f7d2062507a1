% test_drift.m - the binding and include/kinloop.h agree. Every function the
% header declares is a command of the shipped gateway (generated or
% hand-written) that the +kinloop classes reach; the gateway's struct
% converters have exactly the fields, and its enum tables exactly the
% values, that the compiler laid out: the layout probe (bindings/
% kinloop_layout, built from the same header by CMake) prints them.

header = fileread(getenv('KINLOOP_HEADER'));
declared = regexp(header, '\nKL_API[^;(]*?\<kl_(\w+)\s*\(', 'tokens');
declared = unique(cellfun(@(t) t{1}, declared, 'UniformOutput', false));
assert(numel(declared) > 90, 'read %d declarations from kinloop.h', numel(declared));

% ---- every function is a command, and no command invents one ----
[library, test_only] = __kinloop__('commands');
% Not for Octave: an allocator hook is C code (Octave code cannot hand C a
% block of memory), so the shipped gateway leaves the two *_with_alloc out
% and the test gateway binds them with the counting allocator of
% tests/support.c; kl_options_init serves a struct mirror that may be older
% than the library, which a gateway compiled against the header is not (it
% has kl_options_default).
allocators = {'model_new_with_alloc', 'model_read_with_alloc'};
c_only = [allocators, {'options_init'}];
% bound inside another command: solver_sweep records its rows with
% kl_solver_sweep_rows when no callback is given
inside = {'solver_sweep_rows'};
missing = setdiff(setdiff(declared, library), [c_only, inside]);
assert(isempty(missing), 'kinloop.h functions without a command: %s', strjoin(missing, ', '));
assert(all(ismember(allocators, test_only)), 'the test gateway binds the allocator hooks');
assert(~any(ismember(c_only, library)), 'the shipped gateway leaves them out');
% the gateway's own commands, which no kl_ function stands behind
own = {'status_name', 'commands', 'handles', 'enums', 'structs'};
invented = setdiff(setdiff(library, declared), own);
assert(isempty(invented), 'commands without a kinloop.h function: %s', strjoin(invented, ', '));

% ---- every command but the gateway's own is reached by the package ----
package = fileparts(which('kinloop.Model'));
code = '';
for file = dir(fullfile(package, '*.m')).'
  code = [code, fileread(fullfile(package, file.name))];
end
used = regexp(code, '''(\w+)''', 'tokens');   % every quoted word
used = unique(cellfun(@(t) t{1}, used, 'UniformOutput', false));
unwrapped = setdiff(library, [used, own]);
assert(isempty(unwrapped), 'commands the +kinloop package does not reach: %s', ...
       strjoin(unwrapped, ', '));

% ---- structs and enums against the compiler's layout ----
[status, out] = system(getenv('KINLOOP_LAYOUT'));
assert(status == 0, 'the layout probe failed: %s', out);
probe_fields = struct();
probe_enums = struct();
for line = strsplit(strtrim(out), "\n")
  w = strsplit(line{1}, ' ');
  switch w{1}
    case 'struct'
      probe_fields.(w{2}) = {};
    case 'field'
      if ~strcmp(w{3}, 'size')   % the gateway sets size itself
        probe_fields.(w{2}){end + 1} = w{3};
      end
    case 'enum'
      if ~isfield(probe_enums, w{2})
        probe_enums.(w{2}) = [];
      end
      probe_enums.(w{2})(end + 1) = str2double(w{4});
  end
end
declared_structs = regexp(header, 'typedef struct (kl_\w+) \{', 'tokens');
declared_structs = sort(cellfun(@(t) t{1}, declared_structs, 'UniformOutput', false));
assert(isequal(sort(fieldnames(probe_fields)).', declared_structs), 'the probe has every struct');
structs = __kinloop__('structs');
assert(isequal(sort(fieldnames(structs)), sort(fieldnames(probe_fields))));
for name = fieldnames(probe_fields).'
  assert(isequal(structs.(name{1}), probe_fields.(name{1})), '%s: gateway %s, compiler %s', ...
         name{1}, strjoin(structs.(name{1}), ' '), strjoin(probe_fields.(name{1}), ' '));
end
declared_enums = regexp(header, '\nenum (kl_\w+) \{', 'tokens');
declared_enums = sort(cellfun(@(t) t{1}, declared_enums, 'UniformOutput', false));
enums = __kinloop__('enums');
assert(isequal(sort(fieldnames(enums)).', declared_enums) && ...
       isequal(sort(fieldnames(probe_enums)).', declared_enums), 'every enum is known');
for name = declared_enums
  e = enums.(name{1});
  assert(isequal(e.codes, probe_enums.(name{1})), '%s: gateway codes %s, compiler %s', ...
         name{1}, mat2str(e.codes), mat2str(probe_enums.(name{1})));
  assert(numel(unique(lower(e.names))) == numel(e.names), '%s: names are distinct', name{1});
end
assert(strcmp(kinloop.status_name(-7), 'ESELFJOINT'));

% ---- and the library is the header's version ----
v = regexp(header, '#define KINLOOP_VERSION "([0-9.]+)"', 'tokens'){1}{1};
assert(strcmp(kinloop.version(), v), 'library %s, header %s', kinloop.version(), v);
n = sscanf(v, '%d.%d.%d');
assert(kinloop.version_number() == n(1) * 10000 + n(2) * 100 + n(3));
