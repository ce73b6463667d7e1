#!/usr/bin/python3
"""Reference solution for HexMeshDolfinxCrossCheckTest, computed with Debian's python3-dolfinx 0.5.2.

Body: a block of 4 x 4 x 3 voxels of 10 mm plus one bump voxel on top, meshed with one trilinear
hexahedron (Q1) per voxel; nodes at integer multiples of 10 mm. The face z = 0 is fixed; the rest is
free. Load: gravity (dead body force rho * g per reference volume). Material: compressible
neo-Hookean, psi = (mu/2)(J^(-2/3) I1 - 3) + (kappa/4)(J^2 - 1 - 2 ln J), kappa = 2 mu (1 + nu) / (3 (1 - 2 nu)).
Units: mm, kPa (= mN/mm^2), mN; body force rho * g * 1e-6 mN/mm^3 with rho in kg/m^3 and g in m/s^2.
Quadrature: degree 2 on hexahedra = 2 x 2 x 2 Gauss-Legendre points, as in the Java element.

Run:  /usr/bin/python3 make_voxel_body_fixture.py > voxel_body_gravity.txt
Output: comment lines with the parameters, then one line per node "x y z ux uy uz" (mm), sorted by
(z, y, x).
"""
import numpy as np
import ufl
from mpi4py import MPI
from petsc4py import PETSc
import dolfinx
import dolfinx.fem.petsc
import dolfinx.nls.petsc

H = 10.0
MU = 1.0            # kPa
NU = 0.3
RHO = 1000.0        # kg/m^3
G = (-6.0, 0.0, -7.85)  # m/s^2, RAS
LOAD_STEPS = 4

voxels = [(i, j, k) for k in range(3) for j in range(4) for i in range(4)] + [(1, 2, 3)]

# Nodes and cells; cell vertices in DOLFINx's tensor-product hexahedron order
# (0,0,0) (1,0,0) (0,1,0) (1,1,0) (0,0,1) (1,0,1) (0,1,1) (1,1,1).
node_id = {}
cells = []
for (i, j, k) in voxels:
    cell = []
    for (dk, dj, di) in [(0, 0, 0), (0, 0, 1), (0, 1, 0), (0, 1, 1), (1, 0, 0), (1, 0, 1), (1, 1, 0), (1, 1, 1)]:
        key = (i + di, j + dj, k + dk)
        if key not in node_id:
            node_id[key] = len(node_id)
        cell.append(node_id[key])
    cells.append(cell)
x = np.zeros((len(node_id), 3))
for key, n in node_id.items():
    x[n] = np.array(key, dtype=float) * H
cells = np.array(cells, dtype=np.int64)

domain = ufl.Mesh(ufl.VectorElement("Lagrange", "hexahedron", 1))
mesh = dolfinx.mesh.create_mesh(MPI.COMM_WORLD, cells, x, domain)
V = dolfinx.fem.VectorFunctionSpace(mesh, ("Lagrange", 1))

fixed = dolfinx.mesh.locate_entities_boundary(mesh, 2, lambda p: np.isclose(p[2], 0.0))
dofs = dolfinx.fem.locate_dofs_topological(V, 2, fixed)
zero = dolfinx.fem.Constant(mesh, PETSc.ScalarType((0.0, 0.0, 0.0)))
bc = dolfinx.fem.dirichletbc(zero, dofs, V)

u = dolfinx.fem.Function(V)
v = ufl.TestFunction(V)
lam = dolfinx.fem.Constant(mesh, PETSc.ScalarType(0.0))
b = dolfinx.fem.Constant(mesh, PETSc.ScalarType(tuple(RHO * g * 1e-6 for g in G)))
mu = dolfinx.fem.Constant(mesh, PETSc.ScalarType(MU))
kappa_val = 2 * MU * (1 + NU) / (3 * (1 - 2 * NU))
kappa = dolfinx.fem.Constant(mesh, PETSc.ScalarType(kappa_val))

I = ufl.Identity(3)
F = ufl.variable(I + ufl.grad(u))
J = ufl.det(F)
I1 = ufl.tr(F.T * F)
psi = (mu / 2) * (J ** (-2.0 / 3.0) * I1 - 3) + (kappa / 4) * (J ** 2 - 1 - 2 * ufl.ln(J))
dx = ufl.Measure("dx", domain=mesh, metadata={"quadrature_degree": 2})
Pi = psi * dx - lam * ufl.dot(b, u) * dx
residual = ufl.derivative(Pi, u, v)

problem = dolfinx.fem.petsc.NonlinearProblem(residual, u, [bc])
solver = dolfinx.nls.petsc.NewtonSolver(MPI.COMM_WORLD, problem)
solver.atol = 1e-14
solver.rtol = 1e-13
solver.max_it = 50
solver.convergence_criterion = "residual"
ksp = solver.krylov_solver
opts = PETSc.Options()
prefix = ksp.getOptionsPrefix()
opts[f"{prefix}ksp_type"] = "preonly"
opts[f"{prefix}pc_type"] = "lu"
ksp.setFromOptions()

for step in range(1, LOAD_STEPS + 1):
    lam.value = step / LOAD_STEPS
    its, converged = solver.solve(u)
    assert converged, "Newton did not converge at load step %d" % step

coords = V.tabulate_dof_coordinates()
values = u.x.array.reshape(-1, 3)
rows = sorted(zip(map(tuple, np.round(coords, 9)), map(tuple, values)), key=lambda r: (r[0][2], r[0][1], r[0][0]))
print("# dolfinx %s, Q1 hexahedra, quadrature degree 2, neo-Hookean psi = (mu/2)(J^(-2/3) I1 - 3) + (kappa/4)(J^2 - 1 - 2 ln J)"
      % dolfinx.__version__)
print("# h_mm %.17g mu_kpa %.17g nu %.17g kappa_kpa %.17g rho_kg_m3 %.17g g_m_s2 %.17g %.17g %.17g load_steps %d"
      % (H, MU, NU, kappa_val, RHO, G[0], G[1], G[2], LOAD_STEPS))
print("# voxels (i j k) of 10 mm: 4 x 4 x 3 block and bump (1 2 3); face z = 0 fixed")
print("# x_mm y_mm z_mm ux_mm uy_mm uz_mm")
for (p, w) in rows:
    print("%.1f %.1f %.1f %.17g %.17g %.17g" % (p[0] + 0.0, p[1] + 0.0, p[2] + 0.0, w[0], w[1], w[2]))
