// The CSV of one vehicle out of a team's plan CSV: node --test web/jstest/
import test from "node:test";
import assert from "node:assert/strict";
import { csvForVehicle } from "../assets/team-exports.mjs";

// Rows as `solve --format csv` writes a team's day (vehicle id first, the
// unserved rows last with no vehicle); quoting as RFC 4180, section 2.
const csv =
  "vehicle,vehicle_name,order,site,name,arrival\n" +
  "T1,Ines,1,H01,Okafor boiler service,10:00\n" +
  '"T,2",Marek,1,H04,"Bakery ""flue""\ncheck",11:00\n' +
  "T1,Ines,2,H06,Care home radiators,10:48\n" +
  "T12,Sol,1,H09,Dubois thermostat,14:50\n" +
  ",,unserved,H15,Allotment pump house,\n";

test("one vehicle's rows with the header, in plan order", () => {
  assert.equal(csvForVehicle(csv, "T1"),
    "vehicle,vehicle_name,order,site,name,arrival\nT1,Ines,1,H01,Okafor boiler service,10:00\nT1,Ines,2,H06,Care home radiators,10:48\n");
});

test("a quoted id, and a quoted name over two lines, stay one row", () => {
  assert.equal(csvForVehicle(csv, "T,2"), 'vehicle,vehicle_name,order,site,name,arrival\n"T,2",Marek,1,H04,"Bakery ""flue""\ncheck",11:00\n');
});

test("an id that another starts with is not matched, CRLF line ends kept", () => {
  assert.equal(csvForVehicle(csv, "T12"), "vehicle,vehicle_name,order,site,name,arrival\nT12,Sol,1,H09,Dubois thermostat,14:50\n");
  assert.equal(csvForVehicle("a,b\r\nT1,x\r\nT2,y\r\n", "T2"), "a,b\r\nT2,y\r\n");
});
