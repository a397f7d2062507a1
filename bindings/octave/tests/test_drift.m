% test_coverage.m - every function include/kinloop.h declares is a gateway
% command of the same name without its kl_ prefix, every command is used by
% the +kinloop classes, and the gateway invents no library functions.

here = fileparts(mfilename('fullpath'));
header = fileread(fullfile(here, '..', '..', '..', 'include', 'kinloop.h'));
declared = regexp(header, 'KL_API[^;(]*?\<kl_(\w+)\s*\(', 'tokens');
declared = unique(cellfun(@(t) t{1}, declared, 'UniformOutput', false));
assert(numel(declared) > 90, 'read %d declarations from kinloop.h', numel(declared));
commands = __kinloop__('commands');
missing = setdiff(declared, commands);
assert(isempty(missing), 'kinloop.h functions without a command: %s', strjoin(missing, ', '));
% the gateway's own commands, which no kl_ function stands behind
own = {'status_name', 'commands', 'handles', 'allocations', 'set_fail_at'};
invented = setdiff(setdiff(commands, declared), own);
assert(isempty(invented), 'commands without a kinloop.h function: %s', strjoin(invented, ', '));

% every command but the listing itself is named in the classes' code
package = fullfile(here, '..', '+kinloop');
code = '';
for file = dir(fullfile(package, '*.m')).'
  code = [code, fileread(fullfile(package, file.name))];
end
used = regexp(code, '''(\w+)''', 'tokens');
used = unique(cellfun(@(t) t{1}, used, 'UniformOutput', false));
unwrapped = setdiff(commands, [used, {'commands'}]);
assert(isempty(unwrapped), 'commands the +kinloop classes do not reach: %s', strjoin(unwrapped, ', '));

% and the version the gateway was built against is the library's
[library, built] = kinloop.version();
assert(strcmp(library, built), 'library %s, header %s', library, built);
v = sscanf(library, '%d.%d.%d');
assert(kinloop.version_number() == v(1) * 10000 + v(2) * 100 + v(3));
