% octave_example.m: bandmass from Octave (bandmass.mex on the path).
r = bandmass('constants');                       % a struct, numbers stay numbers
printf('k_B = %.6e eV/K\n', r.constants.boltzmann_ev_per_k.value);

ops = bandmass();                                % the operations: struct array
printf('%s: %s\n', ops(1).name, ops(1).summary);

try                                              % errors carry an identifier
  bandmass('constants', struct('temperature_k', 300));
catch err
  printf('%s: %s\n', err.identifier, err.message);
end
