classdef Cam < kinloop.CamMethods
  % kinloop.Cam - a cam from a follower and a motion program (kl_cam): the
  % follower's motion over the cam angle, the pitch curve and the cam
  % surface, pressure angle, radius of curvature and the undercutting and
  % pressure-angle checks.
  %
  %   c = kinloop.Cam();
  %   f = kinloop.cam_follower_init();  f.base_radius = 40; ...
  %   c.set_follower(f);
  %   c.set_program(struct('span', {...}, 'lift', {...}, 'law', {...}));
  %   [pitch, surface] = c.outline(360);   % n-by-2, ready for add_curve_slot
  %
  % The cam is freed when the last reference goes, or by delete(c).

  methods
    function obj = Cam()
      obj.id = __kinloop__('cam_new');
    end
  end
end
